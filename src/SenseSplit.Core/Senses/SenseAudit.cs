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
                int best = 0;
                float bestCos = float.NegativeInfinity;
                for (int i = 0; i < plan.Atoms.Length; i++)
                {
                    float c = TensorPrimitives.Dot(context, model.Atom(plan.Atoms[i]));
                    if (c > bestCos) { bestCos = c; best = i; }
                }
                TensorPrimitives.Add(sums[m.Term][best], context, sums[m.Term][best]);
                counts[m.Term][best]++;
            }
        }
        if (meanCount > 0) TensorPrimitives.Multiply(mean, 1f / meanCount, mean);
        progress?.Report($"corpus: {occurrences.Sum()} occurrences of glossary terms in {corpus.Count} documents");

        var results = new TermSenses[plans.Count];
        for (int t = 0; t < plans.Count; t++)
        {
            var ev = counts[t].Sum() > 0 ? new TermCorpusEvidence(sums[t], counts[t], mean) : null;
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

    private static bool UnitContext(SenseTagger tagger, TokenizedText text, TermMatch m, float[] context)
    {
        if (tagger.Context(text.Rows, m.Start, m.End, context) == 0) return false;
        float n = TensorPrimitives.Norm(context);
        if (n == 0 || !float.IsFinite(n)) return false;
        TensorPrimitives.Multiply(context, 1f / n, context);
        return true;
    }
}
