using System.Numerics.Tensors;

namespace SenseSplit.Core.Senses;

/// <summary>A text split into tokens, each with its vocabulary row (−1 when unknown).</summary>
public sealed record TokenizedText(string Text, TextToken[] Tokens, int[] Rows)
{
    public static TokenizedText From(string text, SenseModel model, Tokenizer? tokenizer = null)
    {
        var tokens = (tokenizer ?? WordTokenizer.Default)(text).ToArray();
        var rows = new int[tokens.Length];
        for (int i = 0; i < tokens.Length; i++) rows[i] = model.IndexOf(tokens[i].Text);
        return new TokenizedText(text, tokens, rows);
    }
}

/// <summary>An occurrence of term <see cref="Term"/> spanning tokens [Start, End).</summary>
public readonly record struct TermMatch(int Term, int Start, int End);

/// <summary>Finds glossary terms in token streams: leftmost, then longest match; matches do not overlap.</summary>
public sealed class TermFinder
{
    private readonly Dictionary<string, (string[] tokens, int term)[]> _byFirst;

    public TermFinder(IReadOnlyList<TermQuery> terms)
    {
        ArgumentNullException.ThrowIfNull(terms);
        _byFirst = Enumerable.Range(0, terms.Count).Where(t => terms[t].Tokens.Length > 0)
            .GroupBy(t => terms[t].Tokens[0], StringComparer.Ordinal)
            .ToDictionary(g => g.Key, g => g.Select(t => (terms[t].Tokens, t)).OrderByDescending(x => x.Tokens.Length).ThenBy(x => x.t).ToArray(), StringComparer.Ordinal);
    }

    public IEnumerable<TermMatch> Find(IReadOnlyList<TextToken> tokens)
    {
        for (int i = 0; i < tokens.Count; i++)
        {
            if (!_byFirst.TryGetValue(tokens[i].Text, out var candidates)) continue;
            foreach (var (toks, term) in candidates)
            {
                if (i + toks.Length > tokens.Count) continue;
                bool ok = true;
                for (int j = 1; j < toks.Length && ok; j++) ok = tokens[i + j].Text == toks[j];
                if (!ok) continue;
                yield return new TermMatch(term, i, i + toks.Length);
                i += toks.Length - 1;
                break;
            }
        }
    }
}

/// <summary>
/// Context vectors and sense assignment of occurrences. The context of tokens [start, end) is
/// c = Σ_{j in window} a/(a + p(w_j)) · v_{w_j} over the known words within <c>Window</c> tokens on each side
/// (smooth inverse frequency weights); an occurrence goes to the sense maximising cos(c, s_k), with confidence
/// softmax_k(cos(c, s_k)/T) of the chosen sense.
/// </summary>
/// <remarks>Arora, Liang &amp; Ma (2017), ICLR, "A simple but tough-to-beat baseline for sentence embeddings", eq. for
/// v_s without the common-component removal (a single context has no corpus to estimate it from).</remarks>
public sealed class SenseTagger
{
    private readonly SenseModel _model;
    public SenseTagger(SenseModel model) => _model = model ?? throw new ArgumentNullException(nameof(model));

    /// <summary>Writes the context vector of tokens [start, end) into <paramref name="context"/>; returns the number of
    /// known context words (0 leaves it zero).</summary>
    public int Context(ReadOnlySpan<int> rows, int start, int end, Span<float> context)
    {
        Guard.Length(context.Length, _model.Dimensions, "context");
        context.Clear();
        int w = _model.Options.Window, used = 0;
        int lo = Math.Max(0, start - w), hi = Math.Min(rows.Length, end + w);
        for (int j = lo; j < hi; j++)
        {
            if (j >= start && j < end) continue;
            int r = rows[j];
            if (r < 0) continue;
            TensorPrimitives.MultiplyAdd(_model.Vectors.Row(r), _model.SifWeights[r], context, context);
            used++;
        }
        return used;
    }

    /// <summary>Best of <paramref name="senseVectors"/> for a context and its softmax confidence. A zero context (no known
    /// words around) goes to the first (heaviest) sense with confidence 1/K.</summary>
    public (int index, double confidence) Assign(ReadOnlySpan<float> context, IReadOnlyList<float[]> senseVectors)
    {
        int k = senseVectors.Count;
        if (k == 0) return (-1, 0);
        if (k == 1) return (0, 1);
        float norm = TensorPrimitives.Norm(context);
        if (norm == 0 || !float.IsFinite(norm)) return (0, 1.0 / k);
        Span<double> z = stackalloc double[k];
        int best = 0;
        for (int i = 0; i < k; i++)
        {
            z[i] = TensorPrimitives.Dot(context, senseVectors[i]) / norm;
            if (z[i] > z[best]) best = i;
        }
        double t = _model.Options.Temperature, sum = 0;
        for (int i = 0; i < k; i++) sum += Math.Exp((z[i] - z[best]) / t);
        return (best, 1 / sum);
    }

    /// <summary>Cuts a readable context around characters [charIndex, charIndex + length): up to
    /// <paramref name="radius"/> characters each side within the occurrence's line, whitespace runs folded to one
    /// space, ellipses where cut.</summary>
    public static string Snippet(string text, int charIndex, int length, int radius = 80)
    {
        int lineStart = charIndex > 0 ? text.LastIndexOf('\n', charIndex - 1) + 1 : 0;
        int lineEnd = text.IndexOf('\n', charIndex + length);
        if (lineEnd < 0) lineEnd = text.Length;
        int lo = Math.Max(lineStart, charIndex - radius), hi = Math.Min(lineEnd, charIndex + length + radius);
        if (lo > 0 && char.IsLowSurrogate(text[lo])) lo++;
        if (hi < text.Length && char.IsLowSurrogate(text[hi])) hi++;
        var s = System.Text.RegularExpressions.Regex.Replace(text[lo..hi], @"\s+", " ").Trim();
        return (lo > lineStart ? "…" : "") + s + (hi < lineEnd ? "…" : "");
    }
}
