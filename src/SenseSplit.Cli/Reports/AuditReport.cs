using System.Globalization;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Reports;

/// <summary>Everything the audit writers need: the model, the glossary and each distinct term's senses (same order).</summary>
public sealed record AuditReport(
    SenseModel Model, ModelManifest Manifest, Glossary Glossary, IReadOnlyList<TermSenses> Results,
    IReadOnlyList<CorpusDocument>? Corpus, int Examples)
{
    private IReadOnlyList<int>[]? _termsByAtom;

    /// <summary>For each atom, the terms (indices into <see cref="Results"/>) one of whose senses uses it.</summary>
    public IReadOnlyList<int> TermsUsing(int atom)
    {
        if (_termsByAtom is null)
        {
            var lists = new List<int>[Model.AtomCount];
            for (int a = 0; a < lists.Length; a++) lists[a] = [];
            for (int t = 0; t < Results.Count; t++)
                foreach (int a in Results[t].Senses.SelectMany(s => s.Atoms).Distinct()) lists[a].Add(t);
            _termsByAtom = lists.Select(l => (IReadOnlyList<int>)l).ToArray();
        }
        return _termsByAtom[atom];
    }

    /// <summary>Term indices in report order: verdict (several, doubtful, single, unknown), then ambiguity, then glossary order.</summary>
    public IReadOnlyList<int> Ranked() => Enumerable.Range(0, Results.Count)
        .OrderBy(t => VerdictNames.Rank(Results[t].Verdict)).ThenByDescending(t => Results[t].PeerRank ?? 0).ThenByDescending(t => Results[t].Ambiguity).ThenBy(t => t).ToArray();

    public string AtomLabel(int atom, int words = int.MaxValue)
    {
        var names = new List<string>();
        foreach (int w in Model.Catalog.LabelOf(atom)) if (w >= 0 && names.Count < words) names.Add(Model.Vectors.Words[w]);
        return string.Join(' ', names);
    }

    public static string AtomFlagNames(AtomFlags f)
    {
        var parts = new List<string>();
        if ((f & AtomFlags.Generic) != 0) parts.Add("generic");
        if ((f & AtomFlags.Diffuse) != 0) parts.Add("diffuse");
        if ((f & AtomFlags.Unused) != 0) parts.Add("unused");
        return string.Join(' ', parts);
    }
}

/// <summary>Number formatting shared by every report, so that the same value prints the same everywhere.</summary>
public static class Fmt
{
    /// <summary>Up to three decimals, invariant culture; NaN and infinities print empty.</summary>
    public static string N(double v) => double.IsFinite(v) ? Math.Round(v, 3).ToString("0.###", CultureInfo.InvariantCulture) : "";

    public static string I(long v) => v.ToString(CultureInfo.InvariantCulture);
}
