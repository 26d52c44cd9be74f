using System.Numerics.Tensors;

namespace SenseSplit.Core.Senses;

/// <summary>
/// The audit of a glossary: resolve and plan every term, then (with a corpus) assign each occurrence to the best of the
/// term's atoms to gather corpus evidence, group atoms into senses, and assign each occurrence again to the final
/// senses to count them and keep the most confident examples.
/// </summary>
public static class SenseAudit
{
    /// <summary>A sense seen in no occurrence gets a note only when the term occurs at least this often.</summary>
    public const int MinOccurrencesForUnseenNote = 20;

    public static IReadOnlyList<TermSenses> Run(SenseModel model, IReadOnlyList<TermQuery> terms,
        IReadOnlyList<TokenizedText>? corpus = null, int examples = 3, IProgress<string>? progress = null,
        CancellationToken cancellation = default)
    {
        ArgumentNullException.ThrowIfNull(model);
        ArgumentNullException.ThrowIfNull(terms);
        Guard.NonNegative(examples);
        progress?.Report($"resolving {terms.Count} terms");
        var plans = model.Plan(terms);
        if (corpus is null || corpus.Count == 0)
        {
            var plain = new TermSenses[plans.Count];
            for (int t = 0; t < plans.Count; t++)
            {
                if (t % 1000 == 0) { cancellation.ThrowIfCancellationRequested(); if (t > 0) progress?.Report($"{t}/{plans.Count} terms split"); }
                plain[t] = model.Finish(plans[t], null);
            }
            return plain;
        }

        int d = model.Dimensions;
        var tagger = new SenseTagger(model);
        var finder = new TermFinder(terms);
        var sums = new float[plans.Count][][];
        var counts = new int[plans.Count][];
        for (int t = 0; t < plans.Count; t++)
        {
            sums[t] = plans[t].Atoms.Select(_ => new float[d]).ToArray();
            counts[t] = new int[plans[t].Atoms.Length];
        }
        var mean = new float[d];
        long meanCount = 0;
        var occurrences = new int[plans.Count];
        var context = new float[d];
        // Best atom of the whole dictionary for each context, found in blocks through one product per block.
        var bestAtom = new Dictionary<int, int>[plans.Count];
        var blockTerms = new int[ContextBlock];
        var block = new float[ContextBlock * d];
        var scores = new float[(long)ContextBlock * model.AtomCount];
        int inBlock = 0;
        void Flush()
        {
            if (inBlock == 0) return;
            Linalg.Gemm.MultiplyTransposed(block.AsSpan(0, inBlock * d), inBlock, model.Atoms, model.AtomCount, d,
                scores.AsSpan(0, inBlock * model.AtomCount), model.Options.Naming.Threads);
            for (int r = 0; r < inBlock; r++)
            {
                int a = BestUsableAtom(model, scores.AsSpan(r * model.AtomCount, model.AtomCount));
                if (a < 0) continue;
                var h = bestAtom[blockTerms[r]] ??= [];
                h[a] = h.GetValueOrDefault(a) + 1;
            }
            inBlock = 0;
        }

        // Pass 1: each occurrence to the best atom of its term's plan (cosine with the unit context).
        for (int doc = 0; doc < corpus.Count; doc++)
        {
            cancellation.ThrowIfCancellationRequested();
            var text = corpus[doc];
            foreach (var m in finder.Find(text.Tokens))
            {
                var plan = plans[m.Term];
                if (plan.Unknown) continue;
                occurrences[m.Term]++;
                if (plan.Atoms.Length == 0 || !UnitContext(tagger, text, m, context)) continue;
                TensorPrimitives.Add(mean, context, mean);
                meanCount++;
                int best = BestOfAtoms(model, plan.Atoms, context);
                TensorPrimitives.Add(sums[m.Term][best], context, sums[m.Term][best]);
                counts[m.Term][best]++;
                context.CopyTo(block.AsSpan(inBlock * d, d));
                blockTerms[inBlock++] = m.Term;
                if (inBlock == ContextBlock) Flush();
            }
        }
        Flush();
        if (meanCount > 0) TensorPrimitives.Multiply(mean, 1f / meanCount, mean);
        progress?.Report($"corpus: {occurrences.Sum()} occurrences of glossary terms in {corpus.Count} documents");

        // Candidates for senses the vectors do not carry: atoms outside the kept ones that at least MinCorpusShare of
        // a term's contexts (and MinCorpusOccurrences) point to; then one more pass sums the contexts of each.
        var opt = model.Options;
        var candidates = new Dictionary<int, float[]>?[plans.Count];
        var candidateCounts = new Dictionary<int, int>?[plans.Count];
        for (int t = 0; t < plans.Count; t++)
        {
            if (bestAtom[t] is null || opt.MinCorpusShare <= 0) continue;
            int n = counts[t].Sum();
            var chosen = bestAtom[t].Where(kv => Array.IndexOf(plans[t].Atoms, kv.Key) < 0
                    && kv.Value >= opt.MinCorpusOccurrences && kv.Value >= opt.MinCorpusShare * n)
                .OrderByDescending(kv => kv.Value).ThenBy(kv => kv.Key).Take(opt.MaxCorpusAtoms).ToArray();
            if (chosen.Length == 0) continue;
            candidates[t] = chosen.ToDictionary(kv => kv.Key, _ => new float[d]);
            candidateCounts[t] = chosen.ToDictionary(kv => kv.Key, _ => 0);
        }
        if (candidates.Any(c => c is not null))
            ConfirmCandidates(model, plans, corpus, finder, tagger, sums, counts, candidates, candidateCounts, cancellation);
        progress?.Report($"corpus: {candidates.Count(c => c is not null && c.Count > 0)} terms with a candidate sense found in the contexts");

        var results = new TermSenses[plans.Count];
        for (int t = 0; t < plans.Count; t++)
        {
            var ev = counts[t].Sum() > 0 ? new TermCorpusEvidence(sums[t], counts[t], mean)
            {
                CorpusAtoms = candidates[t] is { } cand
                    ? cand.OrderByDescending(kv => candidateCounts[t]![kv.Key]).ThenBy(kv => kv.Key)
                        .Select(kv => new CorpusAtom(kv.Key, candidateCounts[t]![kv.Key], kv.Value)).ToArray()
                    : [],
            } : null;
            results[t] = model.Finish(plans[t], ev);
            results[t].Occurrences = occurrences[t];
        }

        // Pass 2: each occurrence to the final senses; keep the most confident examples (earlier ones win ties).
        var senseVectors = results.Select(r => (IReadOnlyList<float[]>)r.Senses.Select(s => s.Vector).ToArray()).ToArray();
        for (int doc = 0; doc < corpus.Count; doc++)
        {
            cancellation.ThrowIfCancellationRequested();
            var text = corpus[doc];
            foreach (var m in finder.Find(text.Tokens))
            {
                var r = results[m.Term];
                if (r.Senses.Count == 0) continue;
                int used = tagger.Context(text.Rows, m.Start, m.End, context);
                var (index, confidence) = used == 0 ? (0, 1.0 / r.Senses.Count) : tagger.Assign(context, senseVectors[m.Term]);
                var sense = r.Senses[index];
                sense.Occurrences++;
                if (examples == 0) continue;
                var first = text.Tokens[m.Start];
                var last = text.Tokens[m.End - 1];
                int len = last.CharIndex + last.CharLength - first.CharIndex;
                if (sense.Examples.Count == examples)
                {
                    int weakest = 0;
                    for (int e = 1; e < examples; e++) if (sense.Examples[e].Confidence < sense.Examples[weakest].Confidence) weakest = e;
                    if (sense.Examples[weakest].Confidence >= confidence) continue;
                    sense.Examples.RemoveAt(weakest);
                }
                sense.Examples.Add(new SenseExample(doc, first.CharIndex, len, first.Offset, confidence, SenseTagger.Snippet(text.Text, first.CharIndex, len)));
            }
        }
        foreach (var r in results)
        {
            foreach (var s in r.Senses) s.Examples.Sort((x, y) => y.Confidence.CompareTo(x.Confidence));
            if (r.Verdict == Verdict.Unknown) continue;
            if (r.Occurrences == 0) r.CorpusNotes.Add("no occurrence in the corpus");
            else if (r.Occurrences >= MinOccurrencesForUnseenNote)
                foreach (var s in r.Senses.Where(s => s.Occurrences == 0))
                    r.CorpusNotes.Add($"sense {s.Id} is assigned none of the {r.Occurrences} occurrences in the corpus");
        }
        return results;
    }

    /// <summary>
    /// Keeps a candidate atom k of term t only when t's contexts point to k at least PeerLift times as often as the
    /// contexts of t's main-sense words (the label words of its heaviest kept atom) do: a topic that merely drifts
    /// into the term's surroundings reaches those words as much as the term; a sense of the term does not. Then sums
    /// the unit contexts of each surviving candidate (for the corpus vote of the grouping).
    /// </summary>
    private static void ConfirmCandidates(SenseModel model, IReadOnlyList<TermPlan> plans, IReadOnlyList<TokenizedText> corpus,
        TermFinder finder, SenseTagger tagger, float[][][] sums, int[][] counts, Dictionary<int, float[]>?[] candidates,
        Dictionary<int, int>?[] candidateCounts, CancellationToken cancellation)
    {
        // The contexts that point to a candidate also went to one of the kept atoms in pass 1; they are taken out of
        // that atom's sum for each candidate that survives, so the corpus vote compares disjoint sets of contexts.
        var lent = new Dictionary<int, (float[][] sums, int[] counts)>?[plans.Count];
        for (int t = 0; t < plans.Count; t++)
            if (candidates[t] is { } c)
                lent[t] = c.Keys.ToDictionary(a => a, _ => (plans[t].Atoms.Select(_ => new float[model.Dimensions]).ToArray(), new int[plans[t].Atoms.Length]));
        var opt = model.Options;
        int d = model.Dimensions, k = model.AtomCount;
        // Peer words of each term with candidates, and the terms each peer row serves.
        var peerHist = new Dictionary<int, Dictionary<int, int>>();
        var peerSeen = new Dictionary<int, int>();
        for (int t = 0; t < plans.Count; t++)
        {
            if (candidates[t] is null) continue;
            foreach (int w in model.Catalog.LabelOf(plans[t].Atoms[0]))
                if (w >= 0 && w != plans[t].Row && !peerHist.ContainsKey(w)) { peerHist[w] = []; peerSeen[w] = 0; }
        }
        var context = new float[d];
        var block = new float[ContextBlock * d];
        var scores = new float[(long)ContextBlock * k];
        var owner = new (int kind, int id)[ContextBlock]; // kind 0: peer row id; kind 1: term id
        int inBlock = 0;
        void Flush()
        {
            if (inBlock == 0) return;
            Linalg.Gemm.MultiplyTransposed(block.AsSpan(0, inBlock * d), inBlock, model.Atoms, k, d, scores.AsSpan(0, inBlock * k), opt.Naming.Threads);
            for (int r = 0; r < inBlock; r++)
            {
                int a = BestUsableAtom(model, scores.AsSpan(r * k, k));
                if (a < 0) continue;
                var (kind, id) = owner[r];
                if (kind == 0) { var h = peerHist[id]; h[a] = h.GetValueOrDefault(a) + 1; }
                else if (candidates[id]!.TryGetValue(a, out var sum))
                {
                    var ctx = block.AsSpan(r * d, d);
                    TensorPrimitives.Add(sum, ctx, sum);
                    candidateCounts[id]![a]++;
                    int best = BestOfAtoms(model, plans[id].Atoms, ctx);
                    var (ls, lc) = lent[id]![a];
                    TensorPrimitives.Add(ls[best], ctx, ls[best]);
                    lc[best]++;
                }
            }
            inBlock = 0;
        }
        void Push(int kind, int id)
        {
            context.CopyTo(block.AsSpan(inBlock * d, d));
            owner[inBlock++] = (kind, id);
            if (inBlock == ContextBlock) Flush();
        }
        for (int doc = 0; doc < corpus.Count; doc++)
        {
            cancellation.ThrowIfCancellationRequested();
            var text = corpus[doc];
            foreach (var m in finder.Find(text.Tokens))
                if (candidates[m.Term] is not null && UnitContext(tagger, text, m, context)) Push(1, m.Term);
            for (int i = 0; i < text.Rows.Length; i++)
            {
                int r = text.Rows[i];
                if (r < 0 || !peerSeen.TryGetValue(r, out int seen) || seen >= opt.MaxPeerContexts) continue;
                peerSeen[r] = seen + 1;
                if (UnitContext(tagger, text, new TermMatch(-1, i, i + 1), context)) Push(0, r);
            }
        }
        Flush();

        for (int t = 0; t < plans.Count; t++)
        {
            if (candidates[t] is null) continue;
            long peerTotal = 0;
            var peerCount = new Dictionary<int, long>();
            foreach (int w in model.Catalog.LabelOf(plans[t].Atoms[0]))
            {
                if (w < 0 || !peerHist.TryGetValue(w, out var h)) continue;
                foreach (var (a, c) in h) { peerTotal += c; peerCount[a] = peerCount.GetValueOrDefault(a) + c; }
            }
            int n = Math.Max(1, counts[t].Sum());
            foreach (int a in candidates[t]!.Keys.ToArray())
            {
                double own = (double)candidateCounts[t]![a] / n;
                double peer = peerTotal > 0 ? (double)peerCount.GetValueOrDefault(a) / peerTotal : 0;
                if (peerTotal < opt.MinCorpusOccurrences || own < opt.PeerLift * peer || candidateCounts[t]![a] < opt.MinCorpusOccurrences)
                {
                    candidates[t]!.Remove(a);
                    candidateCounts[t]!.Remove(a);
                }
            }
            if (candidates[t]!.Count == 0) { candidates[t] = null; candidateCounts[t] = null; continue; }
            foreach (int a in candidates[t]!.Keys)
            {
                var (ls, lc) = lent[t]![a];
                for (int i = 0; i < ls.Length; i++)
                {
                    TensorPrimitives.Subtract(sums[t][i], ls[i], sums[t][i]);
                    counts[t][i] = Math.Max(0, counts[t][i] - lc[i]);
                }
            }
        }
    }

    /// <summary>Contexts coded against the whole dictionary per product.</summary>
    private const int ContextBlock = 512;

    /// <summary>Index into <paramref name="atoms"/> of the atom with the largest cosine to the unit context (first on ties).</summary>
    private static int BestOfAtoms(SenseModel model, int[] atoms, ReadOnlySpan<float> context)
    {
        int best = 0;
        float bestCos = float.NegativeInfinity;
        for (int i = 0; i < atoms.Length; i++)
        {
            float c = TensorPrimitives.Dot(context, model.Atom(atoms[i]));
            if (c > bestCos) { bestCos = c; best = i; }
        }
        return best;
    }

    /// <summary>Index of the largest score among atoms that are neither generic nor diffuse; −1 if none.</summary>
    private static int BestUsableAtom(SenseModel model, ReadOnlySpan<float> scores)
    {
        int best = -1;
        float bestScore = float.NegativeInfinity;
        for (int k = 0; k < scores.Length; k++)
        {
            if (scores[k] <= bestScore || model.Catalog.IsGeneric(k) || model.Catalog.IsDiffuse(k)) continue;
            bestScore = scores[k];
            best = k;
        }
        return best;
    }

    private static bool UnitContext(SenseTagger tagger, TokenizedText text, TermMatch m, float[] context)
    {
        if (tagger.Context(text.Rows, m.Start, m.End, context) == 0) return false;
        float n = TensorPrimitives.Norm(context);
        if (n == 0 || !float.IsFinite(n)) return false;
        TensorPrimitives.Multiply(context, 1f / n, context);
        return true;
    }
}
