using System.Numerics.Tensors;

namespace SenseSplit.Core.Senses;

/// <summary>
/// Groups a term's atoms into senses. Two kept atoms a, b are joined when cos(d_a, d_b) ≥ SameCosine, or when at least
/// VotesToMerge of these signals say "same discourse": cos(d_a, d_b) ≥ DifferentCosine; NPMI of their co-usage by the
/// other words ≥ NpmiVote; label-closeness ratio ≥ LabelVote; (with a corpus) cosine of the centred mean contexts of the
/// term's occurrences assigned to each ≥ CorpusVote. Senses are the connected components of the joins.
/// </summary>
/// <remarks>Why not one sense per atom: on real vectors, counting atoms above a weight threshold barely tracks
/// dictionary sense counts, because several atoms of a word's code are facets of one discourse (Arora, Li, Liang, Ma
/// &amp; Risteski 2018, TACL 6, §5: a discourse mixes 3–4 atoms; atoms above cosine ~0.85 read as one, below ~0.5 as
/// different). The signals and their thresholds are described in docs/methods-senses.md.</remarks>
internal static class SenseGrouping
{
    public static TermSenses Finish(SenseModel model, TermPlan plan, TermCorpusEvidence? evidence, bool applyPeerGate = true, bool groupsOnly = false)
    {
        var opt = model.Options;
        long? count = plan.Row >= 0 && model.Counts is not null ? model.Counts[plan.Row] : null;
        if (plan.Unknown)
            return new TermSenses(plan.Query, Verdict.Unknown, 0, -1, false, null, [], [], [], plan.Notes, plan.CloseSpellings);
        var notes = new List<string>(plan.Notes);
        int kept = plan.Atoms.Length;
        if (kept == 0)
            return new TermSenses(plan.Query, Verdict.Doubtful, 0, plan.Row, plan.Composed, count, [], [], plan.Dropped, notes, []);
        // Atoms found in the corpus contexts join the plan after the code's atoms, with a weight proportional to the
        // share of occurrences that point to them (see SenseAudit).
        var corpusAtoms = evidence?.CorpusAtoms ?? [];
        if (corpusAtoms.Count > 0)
        {
            double keptWeight = plan.Weights.Sum(w => (double)w);
            int assigned = Math.Max(1, evidence!.Counts.Sum());
            plan = plan with
            {
                Atoms = [.. plan.Atoms, .. corpusAtoms.Select(c => c.Atom)],
                Weights = [.. plan.Weights, .. corpusAtoms.Select(c => (float)(keptWeight * c.Occurrences / assigned))],
            };
            evidence = evidence with
            {
                Sums = [.. evidence.Sums, .. corpusAtoms.Select(c => c.Sum)],
                Counts = [.. evidence.Counts, .. corpusAtoms.Select(c => c.Occurrences)],
            };
        }
        int m = plan.Atoms.Length;
        bool FromCorpus(int i) => i >= kept;

        // Pairwise evidence and union–find over the kept atoms.
        var parent = Enumerable.Range(0, m).ToArray();
        int Find(int x) { while (parent[x] != x) x = parent[x] = parent[parent[x]]; return x; }
        var pairs = new List<AtomPairEvidence>();
        var centred = evidence is null ? null : CentredMeans(evidence, opt.MinOccurrencesForVote);
        for (int i = 0; i < m; i++)
        {
            for (int j = i + 1; j < m; j++)
            {
                int a = plan.Atoms[i], b = plan.Atoms[j];
                double cos = TensorPrimitives.Dot(model.Atom(a), model.Atom(b));
                double npmi = model.CoUsage.Npmi(a, b, model.Codes, plan.Row);
                double label = model.LabelRatio(a, b, plan.Row);
                double corpus = centred is not null && centred[i] is not null && centred[j] is not null
                    ? TensorPrimitives.CosineSimilarity(centred[i]!, centred[j]!) : double.NaN;
                int votes = (cos >= opt.DifferentCosine ? 1 : 0) + (npmi >= opt.NpmiVote ? 1 : 0)
                    + (label >= opt.LabelVote ? 1 : 0) + (corpus >= opt.CorpusVote ? 1 : 0);
                // An atom found only in the contexts must look different by every signal: one "same" vote merges it.
                bool linked = cos >= opt.SameCosine || votes >= (FromCorpus(i) || FromCorpus(j) ? 1 : opt.VotesToMerge);
                pairs.Add(new AtomPairEvidence(a, b, cos, npmi, label, corpus, votes, linked));
                if (linked) parent[Find(i)] = Find(j);
            }
        }

        // Components, heaviest first (atoms inside already sorted by weight).
        var groups = Enumerable.Range(0, m).GroupBy(Find)
            .Select(g => g.ToArray())
            .Select(ix => (ix, weight: ix.Sum(i => (double)plan.Weights[i])))
            .OrderByDescending(g => g.weight).ThenBy(g => plan.Atoms[g.ix[0]])
            .ToList();
        if (kept < m)
        {
            // A corpus atom that joined a group of the code's atoms is a facet of that sense, not a sense: left out.
            var facets = groups.Where(g => g.ix.Any(i => !FromCorpus(i)) && g.ix.Any(FromCorpus)).SelectMany(g => g.ix.Where(FromCorpus)).ToArray();
            foreach (int i in facets) notes.Add($"atom {plan.Atoms[i]} (from the corpus contexts) reads as part of a sense of the code; left out");
            groups = groups.Select(g => g.ix.Any(i => !FromCorpus(i)) ? (ix: g.ix.Where(i => !FromCorpus(i)).ToArray(), g.weight) : g)
                .Select(g => (g.ix, weight: g.ix.Sum(i => (double)plan.Weights[i])))
                .OrderByDescending(g => g.ix.Any(i => !FromCorpus(i))).ThenByDescending(g => g.weight).ThenBy(g => plan.Atoms[g.ix[0]]).ToList();
        }
        var codeGroups = groups.Where(g => !FromCorpus(g.ix[0])).ToList();
        var vectors = codeGroups.Select(g => SenseVector(model, plan, g.ix)).ToList();
        double total = codeGroups.Sum(g => g.weight);
        double ambiguity = Ambiguity(codeGroups.Select(g => total > 0 ? g.weight / total : 0).ToArray(), vectors);
        if (groupsOnly)
            return new TermSenses(plan.Query, groups.Count > 1 ? Verdict.Several : Verdict.Single, ambiguity, plan.Row, plan.Composed, count, [], pairs, plan.Dropped, notes, []);

        // Peer gate: a split counts only when the term is more mixed than most words of about its frequency
        // (docs/methods-senses.md, "Peer rank"); otherwise its facets are reported as one sense.
        double? peerRank = applyPeerGate ? model.PeerRank(count, ambiguity) : null;
        bool demoted = false;
        if (codeGroups.Count > 1 && peerRank is double pr && pr < opt.SeveralPeerRank)
        {
            demoted = true;
            notes.Add(string.Create(System.Globalization.CultureInfo.InvariantCulture,
                $"its atoms form {codeGroups.Count} groups, but it is more mixed than only {100 * pr:0}% of {(count is null ? "the sampled vocabulary words" : "words of about its frequency")} (a split needs {100 * opt.SeveralPeerRank:0}%): reported as one sense"));
            var all = Enumerable.Range(0, kept).ToArray();
            codeGroups = [(all, all.Sum(i => (double)plan.Weights[i]))];
        }
        // Senses found only in the corpus follow the code's senses, heaviest first.
        groups = [.. codeGroups, .. groups.Where(g => FromCorpus(g.ix[0]))];
        vectors = groups.Select(g => SenseVector(model, plan, g.ix)).ToList();
        total = groups.Sum(g => g.weight);
        if (groups.Count > codeGroups.Count)
            ambiguity = Ambiguity(groups.Select(g => total > 0 ? g.weight / total : 0).ToArray(), vectors);
        var component = new int[m];
        Array.Fill(component, -1);
        for (int gi = 0; gi < groups.Count; gi++) foreach (int i in groups[gi].ix) component[i] = gi;

        var excluded = ExcludedRows(model, plan);
        var senses = new List<SenseInfo>();
        var neighbourLists = new List<int[]>();
        var labelLists = new List<int[]>();
        for (int gi = 0; gi < groups.Count; gi++)
        {
            var ix = groups[gi].ix;
            labelLists.Add(SenseLabel(model, plan, ix, vectors[gi], excluded));
            neighbourLists.Add(Neighbours(model, plan, ix, vectors[gi], excluded));
        }
        for (int gi = 0; gi < groups.Count; gi++)
        {
            var ix = groups[gi].ix;
            var reasons = new List<string>();
            if (ix.All(i => model.Catalog.IsDiffuse(plan.Atoms[i]))) reasons.Add("rests on diffuse atoms only");
            if (groups.Count > 1)
            {
                foreach (var p in pairs)
                {
                    if (p.Linked || p.Votes < opt.VotesToMerge - 1 || p.Votes == 0) continue;
                    int ia = Array.IndexOf(plan.Atoms, p.AtomA), ib = Array.IndexOf(plan.Atoms, p.AtomB);
                    if (component[ia] < 0 || component[ib] < 0) continue;
                    int other = component[ia] == gi ? component[ib] : component[ib] == gi ? component[ia] : -1;
                    if (other >= 0 && other != gi && gi > other)
                    {
                        reasons.Add($"mixed evidence: atoms {p.AtomA} and {p.AtomB} got {p.Votes} of the {opt.VotesToMerge} votes needed to merge with sense {other + 1}");
                        break;
                    }
                }
            }
            var cues = Cues(model, gi, vectors, labelLists, neighbourLists, excluded);
            senses.Add(new SenseInfo(gi + 1, ix.Select(i => plan.Atoms[i]).ToArray(), ix.Select(i => plan.Weights[i]).ToArray(),
                groups[gi].weight, total > 0 ? groups[gi].weight / total : 0, vectors[gi],
                labelLists[gi].Select(w => model.Vectors.Words[w]).ToArray(),
                neighbourLists[gi].Select(w => model.Vectors.Words[w]).ToArray(),
                cues, reasons.Count > 0, string.Join("; ", reasons))
            {
                FromCorpus = FromCorpus(ix[0]),
            });
        }

        Verdict verdict = senses.Count == 1 ? Verdict.Single
            : senses.Count(s => !s.Doubtful) >= 2 ? Verdict.Several : Verdict.Doubtful;
        return new TermSenses(plan.Query, verdict, ambiguity, plan.Row, plan.Composed, count, senses, pairs, plan.Dropped, notes, [])
        {
            PeerRank = peerRank,
            Demoted = demoted,
        };
    }

    /// <summary>Ambiguity = (1 − Σ_k share_k²) · (1 − max_{k&lt;l} max(0, cos(s_k, s_l))): the Gini–Simpson index of the
    /// sense shares (0 for one sense, 1/2 for two balanced ones) times how far apart the two closest senses are.</summary>
    internal static double Ambiguity(IReadOnlyList<SenseInfo> senses)
        => Ambiguity(senses.Select(s => s.Share).ToArray(), senses.Select(s => s.Vector).ToList());

    internal static double Ambiguity(IReadOnlyList<double> shares, IReadOnlyList<float[]> vectors)
    {
        if (shares.Count < 2) return 0;
        double gs = 1 - shares.Sum(s => s * s);
        double maxCos = 0;
        for (int k = 0; k < vectors.Count; k++)
            for (int l = k + 1; l < vectors.Count; l++)
                maxCos = Math.Max(maxCos, TensorPrimitives.Dot(vectors[k], vectors[l]));
        return gs * (1 - maxCos);
    }

    /// <summary>Ambiguity of the grouping alone (no labels, neighbours or cues): what the peer table needs.</summary>
    internal static double GroupAmbiguity(SenseModel model, TermPlan plan) => Finish(model, plan, null, applyPeerGate: false, groupsOnly: true).Ambiguity;

    /// <summary>normalise(Σ_i weight_i · atom_i) over the plan's atoms <paramref name="ix"/>.</summary>
    private static float[] SenseVector(SenseModel model, TermPlan plan, int[] ix)
    {
        var v = new float[model.Dimensions];
        foreach (int i in ix) TensorPrimitives.MultiplyAdd(model.Atom(plan.Atoms[i]), plan.Weights[i], v, v);
        float n = TensorPrimitives.Norm(v);
        if (n > 0) TensorPrimitives.Multiply(v, 1f / n, v);
        return v;
    }

    private static float[]?[] CentredMeans(TermCorpusEvidence e, int minCount)
    {
        var result = new float[]?[e.Sums.Length];
        for (int i = 0; i < e.Sums.Length; i++)
        {
            if (e.Counts[i] < minCount) continue;
            var v = new float[e.Mean.Length];
            TensorPrimitives.Multiply(e.Sums[i], 1f / e.Counts[i], v);
            TensorPrimitives.Subtract(v, e.Mean, v);
            result[i] = v;
        }
        return result;
    }

    /// <summary>Rows never shown as a sense's words: the term itself and, for a composed term, its words.</summary>
    private static HashSet<int> ExcludedRows(SenseModel model, TermPlan plan)
    {
        var set = new HashSet<int>();
        if (plan.Row >= 0) set.Add(plan.Row);
        foreach (var tok in plan.Query.Tokens) { int r = model.IndexOf(tok); if (r >= 0) set.Add(r); }
        return set;
    }

    /// <summary>Label of a sense: the union of its atoms' label words ranked by cosine with the sense vector.</summary>
    private static int[] SenseLabel(SenseModel model, TermPlan plan, int[] ix, float[] sense, HashSet<int> excluded)
    {
        var words = new HashSet<int>();
        foreach (int i in ix) foreach (int w in model.Catalog.LabelOf(plan.Atoms[i])) if (w >= 0 && !excluded.Contains(w)) words.Add(w);
        return words.Select(w => (w, c: TensorPrimitives.Dot(model.Vectors.Row(w), sense)))
            .OrderByDescending(x => x.c).ThenBy(x => x.w).Take(model.Catalog.LabelWords).Select(x => x.w).ToArray();
    }

    /// <summary>Neighbours within a sense: among the words whose code gives one of the sense's atoms a positive weight,
    /// those nearest to q = normalise(t + s), the bisector of the term vector t and the sense vector s.</summary>
    private static int[] Neighbours(SenseModel model, TermPlan plan, int[] ix, float[] sense, HashSet<int> excluded)
    {
        int n = model.Options.Neighbours;
        if (n == 0) return [];
        int d = model.Dimensions;
        var q = new float[d];
        TensorPrimitives.Add(plan.Vector!, sense, q);
        float qn = TensorPrimitives.Norm(q);
        if (qn > 0) TensorPrimitives.Multiply(q, 1f / qn, q);
        var scores = new float[n];
        var ids = new int[n];
        int size = 0;
        var seen = new HashSet<int>();
        foreach (int i in ix)
        {
            foreach (int w in model.WordsUsing(plan.Atoms[i]))
            {
                if (excluded.Contains(w) || !seen.Add(w)) continue;
                TopK.Push(scores, ids, ref size, TensorPrimitives.Dot(model.Vectors.Row(w), q), w);
            }
        }
        TopK.SortDescending(scores, ids, size);
        return ids.AsSpan(0, size).ToArray();
    }

    /// <summary>Cues of sense k: words from the label and neighbour lists of all senses, scored
    /// cos(w, s_k) − max_{j≠k} cos(w, s_j) (just cos(w, s_k) for one sense); the best positive ones.</summary>
    private static string[] Cues(SenseModel model, int k, List<float[]> senses, List<int[]> labels, List<int[]> neighbours, HashSet<int> excluded)
    {
        int n = model.Options.Cues;
        var candidates = new HashSet<int>();
        for (int g = 0; g < senses.Count; g++) { candidates.UnionWith(labels[g]); candidates.UnionWith(neighbours[g]); }
        candidates.ExceptWith(excluded);
        var scored = new List<(int w, double s)>();
        foreach (int w in candidates)
        {
            var v = model.Vectors.Row(w);
            double own = TensorPrimitives.Dot(v, senses[k]);
            double rival = double.NegativeInfinity;
            for (int g = 0; g < senses.Count; g++) if (g != k) rival = Math.Max(rival, TensorPrimitives.Dot(v, senses[g]));
            double s = senses.Count == 1 ? own : own - rival;
            if (s > 0) scored.Add((w, s));
        }
        return scored.OrderByDescending(x => x.s).ThenBy(x => x.w).Take(n).Select(x => model.Vectors.Words[x.w]).ToArray();
    }
}
