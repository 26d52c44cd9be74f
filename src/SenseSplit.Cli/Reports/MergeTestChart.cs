using System.Globalization;
using System.Xml.Linq;
using SenseSplit.Core.Senses.MergeTest;

namespace SenseSplit.Cli.Reports;

/// <summary>
/// A self-contained SVG of the merge test: β/α against r on log–log axes, one dot per pair, the median of each ratio
/// bin, the fitted logarithmic and power laws, the proportional law 1/r and the 3/r guide, with legend and axis labels.
/// Only presentation attributes are used (no style sheet, ids or scripts), so the same markup can be placed inline
/// in an HTML page. Pairs with β/α ≤ 0 cannot sit on a log axis; they are drawn as ticks under the plot and counted.
/// </summary>
public static class MergeTestChart
{
    private static readonly XNamespace Svg = "http://www.w3.org/2000/svg";
    private const double Width = 800, Height = 500;
    private const double Left = 78, Right = 262, Top = 46, Bottom = 72;

    private const string PointColour = "#3d6b99";
    private const string MedianColour = "#c8581f";
    private const string LogColour = "#1f8a70";
    private const string PowerColour = "#7a4fa3";
    private const string ProportionalColour = "#4a4a4a";
    private const string GuideColour = "#9a9a9a";

    /// <summary>The chart as SVG markup; with <paramref name="standalone"/> an XML declaration is prepended (for a
    /// separate .svg file); without it the markup is ready to inline.</summary>
    public static string Render(MergeTestOutcome outcome, bool standalone = false)
    {
        ArgumentNullException.ThrowIfNull(outcome);
        var laws = outcome.Laws;
        var usable = outcome.Pairs.Where(p => p.HasWeightRatio).ToList();
        var positive = usable.Where(p => p.WeightRatio > 0).ToList();
        int nonPositive = usable.Count - positive.Count;

        // X from r = 1 to the next decade at or above the largest ratio shown.
        double maxRatio = Math.Max(outcome.Bins.MaxRatio, usable.Count > 0 ? usable.Max(p => p.Ratio) : 1);
        double xMax = Math.Max(1, Math.Ceiling(Math.Log10(maxRatio) - 1e-9));
        // Y spans the data and the 1/r line over the x range, in whole decades, within [1e-6, 1e3].
        var ys = positive.Select(p => Math.Log10(p.WeightRatio)).Append(-xMax).Append(0.0).ToList();
        double yMin = Math.Max(-6, Math.Floor(ys.Min() + 1e-9));
        double yMax = Math.Min(3, Math.Ceiling(ys.Max() - 1e-9));
        if (yMax <= yMin) yMax = yMin + 1;

        double plotW = Width - Left - Right, plotH = Height - Top - Bottom;
        double X(double logR) => Left + plotW * logR / xMax;
        double Y(double logQ) => Top + plotH * (yMax - Math.Clamp(logQ, yMin, yMax)) / (yMax - yMin);

        var root = new XElement(Svg + "svg",
            new XAttribute("width", F(Width)), new XAttribute("height", F(Height)),
            new XAttribute("viewBox", $"0 0 {F(Width)} {F(Height)}"),
            new XAttribute("role", "img"),
            new XAttribute("font-family", "Helvetica, Arial, sans-serif"), new XAttribute("font-size", "12"),
            new XElement(Svg + "title", "Merge test: weight of the rarer word (β/α) against the frequency ratio r"),
            new XElement(Svg + "rect", new XAttribute("x", 0), new XAttribute("y", 0), new XAttribute("width", F(Width)),
                new XAttribute("height", F(Height)), new XAttribute("fill", "#ffffff")),
            Text(Left, 24, $"Rarer word's weight against frequency ratio ({usable.Count} pairs, verdict: {outcome.Verdict.Label})", anchor: "start", size: 14, weight: "bold"));

        // Plot frame and decade grid.
        var grid = new XElement(Svg + "g", new XAttribute("stroke", "#e4e4e4"), new XAttribute("stroke-width", "1"));
        var labels = new XElement(Svg + "g", new XAttribute("fill", "#333333"));
        for (int d = 0; d <= (int)xMax; d++)
        {
            grid.Add(Line(X(d), Top, X(d), Top + plotH));
            labels.Add(Text(X(d), Top + plotH + 16, Decade(d)));
        }
        for (int d = (int)yMin; d <= (int)yMax; d++)
        {
            grid.Add(Line(Left, Y(d), Left + plotW, Y(d)));
            labels.Add(Text(Left - 6, Y(d) + 4, Decade(d), anchor: "end"));
        }
        root.Add(grid, labels);
        root.Add(new XElement(Svg + "rect", new XAttribute("x", F(Left)), new XAttribute("y", F(Top)), new XAttribute("width", F(plotW)),
            new XAttribute("height", F(plotH)), new XAttribute("fill", "none"), new XAttribute("stroke", "#888888")));
        root.Add(Text(Left + plotW / 2, Height - 36, "frequency ratio r = f1/f2 (log scale)"));
        root.Add(new XElement(Svg + "text", new XAttribute("x", 0), new XAttribute("y", 0), new XAttribute("text-anchor", "middle"),
            new XAttribute("transform", $"translate({F(22)},{F(Top + plotH / 2)}) rotate(-90)"), "β/α, weight of rarer word over frequent word (log scale)"));

        // Curves: sampled in log r, cut where a law leaves the positive half-line.
        var curves = new XElement(Svg + "g", new XAttribute("fill", "none"), new XAttribute("stroke-width", "2"));
        curves.Add(Curve(l => -l, xMax, X, Y, yMin, yMax, GuideColour, "2 5", 1.5, shift: Math.Log10(laws.Settings.WellAboveFactor)));
        curves.Add(Curve(l => -l, xMax, X, Y, yMin, yMax, ProportionalColour, "7 4", 2));
        if (double.IsFinite(laws.C.Estimate))
        {
            double c = laws.C.Estimate;
            curves.Add(Curve(l => 1 - c * l > 0 ? Math.Log10(1 - c * l) : double.NaN, xMax, X, Y, yMin, yMax, LogColour, null, 2.5));
        }
        if (double.IsFinite(laws.Gamma.Estimate) && laws.PowerScale > 0)
        {
            double logA = Math.Log10(laws.PowerScale), g = laws.Gamma.Estimate;
            curves.Add(Curve(l => logA - g * l, xMax, X, Y, yMin, yMax, PowerColour, null, 2.5));
        }

        // Pairs: dots; pairs with β/α ≤ 0 as ticks under the plot area.
        var dots = new XElement(Svg + "g", new XAttribute("fill", PointColour), new XAttribute("fill-opacity", "0.55"));
        foreach (var p in positive)
            dots.Add(new XElement(Svg + "circle", new XAttribute("cx", F(X(Math.Log10(p.Ratio)))), new XAttribute("cy", F(Y(Math.Log10(p.WeightRatio)))),
                new XAttribute("r", "3.2"), new XElement(Svg + "title", $"{p.Pair.FrequentWord} + {p.Pair.RareWord}: r = {G(p.Ratio)}, β/α = {G(p.WeightRatio)}")));
        var ticks = new XElement(Svg + "g", new XAttribute("stroke", MedianColour), new XAttribute("stroke-width", "1.5"));
        foreach (var p in usable.Where(p => !(p.WeightRatio > 0)))
        {
            double x = X(Math.Log10(p.Ratio));
            ticks.Add(new XElement(Svg + "line", new XAttribute("x1", F(x)), new XAttribute("y1", F(Top + plotH + 2)),
                new XAttribute("x2", F(x)), new XAttribute("y2", F(Top + plotH + 8)),
                new XElement(Svg + "title", $"{p.Pair.FrequentWord} + {p.Pair.RareWord}: r = {G(p.Ratio)}, β/α = {G(p.WeightRatio)} (not on log axis)")));
        }

        // Bin medians: outlined diamonds.
        var medians = new XElement(Svg + "g", new XAttribute("fill", MedianColour), new XAttribute("stroke", "#ffffff"), new XAttribute("stroke-width", "1.5"));
        foreach (var b in laws.Bins.Where(b => b.Pairs > 0 && b.MedianWeightRatio > 0))
        {
            double cx = X(Math.Log10(b.MedianRatio)), cy = Y(Math.Log10(b.MedianWeightRatio));
            medians.Add(new XElement(Svg + "polygon", new XAttribute("points", $"{F(cx)},{F(cy - 7)} {F(cx + 7)},{F(cy)} {F(cx)},{F(cy + 7)} {F(cx - 7)},{F(cy)}"),
                new XElement(Svg + "title", $"bin {outcome.Bins.Label(b.Bin)}: {b.Pairs} pairs, median r = {G(b.MedianRatio)}, median β/α = {G(b.MedianWeightRatio)}")));
        }
        root.Add(curves, dots, ticks, medians);
        if (nonPositive > 0)
            root.Add(Text(Left, Height - 14, $"{nonPositive} pair(s) with β/α ≤ 0 are marked as ticks below the axis", anchor: "start", size: 11));

        root.Add(Legend(laws, outcome.Verdict, Left + plotW + 18, Top + 4));
        string markup = root.ToString(SaveOptions.None);
        return standalone ? "<?xml version=\"1.0\" encoding=\"utf-8\"?>\n" + markup + "\n" : markup;
    }

    private static XElement Legend(WeightLawsResult laws, MergeVerdictResult verdict, double x, double y)
    {
        var g = new XElement(Svg + "g");
        var rows = new List<(Func<double, double, XElement> symbol, string label)>
        {
            ((sx, sy) => Dot(sx, sy), "one merged pair"),
            ((sx, sy) => Diamond(sx, sy), "median of a ratio bin"),
            ((sx, sy) => Swatch(sx, sy, LogColour, null), double.IsFinite(laws.C.Estimate)
                ? $"logarithmic: 1 − {G(laws.C.Estimate)}·log10 r" : "logarithmic: not fitted"),
            ((sx, sy) => Swatch(sx, sy, PowerColour, null), double.IsFinite(laws.Gamma.Estimate)
                ? $"power: {G(laws.PowerScale)}·r^−{G(laws.Gamma.Estimate)}" : "power: not fitted"),
            ((sx, sy) => Swatch(sx, sy, ProportionalColour, "7 4"), "proportional: 1/r"),
            ((sx, sy) => Swatch(sx, sy, GuideColour, "2 5"), $"{G(laws.Settings.WellAboveFactor)}/r (well above share)"),
        };
        g.Add(Text(x, y, "Legend", anchor: "start", weight: "bold"));
        double rowY = y + 22;
        foreach (var (symbol, label) in rows)
        {
            g.Add(symbol(x + 10, rowY - 4));
            g.Add(Text(x + 26, rowY, label, anchor: "start", size: 11));
            rowY += 20;
        }
        rowY += 8;
        g.Add(Text(x, rowY, $"best fit (BIC): {(laws.BetterLaw is { } law ? WeightLaws.Name(law) : "none")}", anchor: "start", size: 11, weight: "bold")); rowY += 16;
        if (double.IsFinite(laws.C.Lower))
        {
            g.Add(Text(x, rowY, $"c 95%: [{G(laws.C.Lower)}, {G(laws.C.Upper)}]", anchor: "start", size: 11)); rowY += 16;
        }
        if (double.IsFinite(laws.Gamma.Lower))
        {
            g.Add(Text(x, rowY, $"γ 95%: [{G(laws.Gamma.Lower)}, {G(laws.Gamma.Upper)}]", anchor: "start", size: 11)); rowY += 16;
        }
        g.Add(Text(x, rowY, $"median cos to span: {G(laws.MedianCosineToSpan)}", anchor: "start", size: 11));
        if (verdict.RelativeToFloor)
        {
            rowY += 16;
            g.Add(Text(x, rowY, $"noise floor (untouched words): {G(verdict.NoiseFloor)}", anchor: "start", size: 11));
        }
        return g;
    }

    private static XElement Curve(Func<double, double> logQ, double xMax, Func<double, double> x, Func<double, double> y,
        double yMin, double yMax, string colour, string? dash, double width, double shift = 0)
    {
        var g = new XElement(Svg + "g", new XAttribute("stroke", colour), new XAttribute("stroke-width", F(width)));
        if (dash is not null) g.Add(new XAttribute("stroke-dasharray", dash));
        var segment = new List<string>();
        void Flush()
        {
            if (segment.Count >= 2) g.Add(new XElement(Svg + "polyline", new XAttribute("points", string.Join(" ", segment))));
            segment.Clear();
        }
        const int steps = 160;
        for (int i = 0; i <= steps; i++)
        {
            double l = xMax * i / steps;
            double v = logQ(l) + shift;
            // Leave the plot (or the law's domain) and the line breaks; it is not drawn along the frame.
            if (!double.IsFinite(v) || v < yMin || v > yMax) { Flush(); continue; }
            segment.Add($"{F(x(l))},{F(y(v))}");
        }
        Flush();
        return g;
    }

    private static XElement Dot(double x, double y) => new(Svg + "circle", new XAttribute("cx", F(x)), new XAttribute("cy", F(y)),
        new XAttribute("r", "3.2"), new XAttribute("fill", PointColour), new XAttribute("fill-opacity", "0.55"));

    private static XElement Diamond(double x, double y) => new(Svg + "polygon",
        new XAttribute("points", $"{F(x)},{F(y - 6)} {F(x + 6)},{F(y)} {F(x)},{F(y + 6)} {F(x - 6)},{F(y)}"), new XAttribute("fill", MedianColour));

    private static XElement Swatch(double x, double y, string colour, string? dash)
    {
        var line = new XElement(Svg + "line", new XAttribute("x1", F(x - 9)), new XAttribute("y1", F(y)), new XAttribute("x2", F(x + 9)),
            new XAttribute("y2", F(y)), new XAttribute("stroke", colour), new XAttribute("stroke-width", "2.5"));
        if (dash is not null) line.Add(new XAttribute("stroke-dasharray", dash));
        return line;
    }

    private static XElement Line(double x1, double y1, double x2, double y2) => new(Svg + "line",
        new XAttribute("x1", F(x1)), new XAttribute("y1", F(y1)), new XAttribute("x2", F(x2)), new XAttribute("y2", F(y2)));

    private static XElement Text(double x, double y, string content, string anchor = "middle", double size = 12, string? weight = null)
    {
        var t = new XElement(Svg + "text", new XAttribute("x", F(x)), new XAttribute("y", F(y)), new XAttribute("text-anchor", anchor), content);
        if (size != 12) t.Add(new XAttribute("font-size", F(size)));
        if (weight is not null) t.Add(new XAttribute("font-weight", weight));
        return t;
    }

    // Decade labels: 0.001, 0.01, 0.1, 1, 10, 100, 1000; beyond that 10^k.
    private static string Decade(int d) => d switch
    {
        >= 0 and <= 4 => Math.Pow(10, d).ToString("0", CultureInfo.InvariantCulture),
        < 0 and >= -3 => Math.Pow(10, d).ToString("0.###", CultureInfo.InvariantCulture),
        _ => $"1e{d.ToString(CultureInfo.InvariantCulture)}",
    };

    private static string F(double v) => v.ToString("0.##", CultureInfo.InvariantCulture);
    private static string G(double v) => double.IsFinite(v) ? v.ToString("G3", CultureInfo.InvariantCulture) : "n/a";
}
