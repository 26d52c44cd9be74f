namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>
/// Log-spaced bins of the frequency ratio r = f1/f2 over [1, <see cref="MaxRatio"/>]: bin k holds
/// 10^(k·L/B) ≤ r &lt; 10^((k+1)·L/B) with L = log10(MaxRatio) and B = <see cref="Count"/>. A ratio at or above the
/// top edge falls in the last bin, so every r ≥ 1 has a bin.
/// </summary>
public sealed record RatioBins
{
    public RatioBins(int count, double maxRatio)
    {
        Guard.Positive(count);
        if (!double.IsFinite(maxRatio) || maxRatio <= 1)
            throw new ArgumentOutOfRangeException(nameof(maxRatio), maxRatio, $"the largest ratio ({maxRatio}) must be finite and above 1");
        Count = count;
        MaxRatio = maxRatio;
    }

    public int Count { get; }
    public double MaxRatio { get; }

    /// <summary>Lower edge of bin <paramref name="bin"/> (1 for bin 0).</summary>
    public double Lower(int bin) => Math.Pow(10, bin * Math.Log10(MaxRatio) / Count);

    /// <summary>Upper edge of bin <paramref name="bin"/> (<see cref="MaxRatio"/> for the last bin).</summary>
    public double Upper(int bin) => bin == Count - 1 ? MaxRatio : Lower(bin + 1);

    /// <summary>The bin of ratio <paramref name="ratio"/> (≥ 1); ratios at or past the top edge go to the last bin.</summary>
    public int Of(double ratio)
    {
        if (!(ratio >= 1)) throw new ArgumentOutOfRangeException(nameof(ratio), ratio, $"ratio ({ratio}) must be at least 1");
        int bin = (int)Math.Floor(Math.Log10(ratio) * Count / Math.Log10(MaxRatio));
        bin = Math.Clamp(bin, 0, Count - 1);
        // Rounding of the logarithm at an edge: settle against the edges as Lower() computes them.
        if (bin > 0 && ratio < Lower(bin)) bin--;
        else if (bin + 1 < Count && ratio >= Lower(bin + 1)) bin++;
        return bin;
    }

    /// <summary>"[1, 2.371)"-style label with four significant digits.</summary>
    public string Label(int bin)
    {
        string lo = Lower(bin).ToString("G4", System.Globalization.CultureInfo.InvariantCulture);
        string hi = Upper(bin).ToString("G4", System.Globalization.CultureInfo.InvariantCulture);
        return bin == Count - 1 ? $"[{lo}, {hi}+]" : $"[{lo}, {hi})";
    }
}
