using System.Numerics.Tensors;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Core.Senses;

/// <summary>
/// A synthetic model with known senses, for tests and benchmarks. Atoms come in topics ("discourses") of
/// <c>atomsPerTopic</c> atoms around a shared centre (within-topic cosine ≈ 1/(1 + 1.1²) ≈ 0.45; in some topics one
/// pair is nearly parallel, cosine ≈ 0.9); a few generic atoms are random directions used by half the words with small
/// weight. A one-sense word mixes 2–3 atoms of one topic (plus maybe a generic atom and a tiny off-topic atom, the
/// "noise" slots); a two-sense word mixes 1–2 atoms of each of two topics with balanced weights. Vectors are the
/// normalised mixtures plus a little noise; codes are the planted mixtures (scaled with the vector), heaviest first.
/// </summary>
/// <remarks>The shape follows the facts of Arora, Li, Liang, Ma &amp; Risteski (2018), TACL 6, §5: a discourse mixes
/// 3–4 atoms, a word uses up to 5 with the last ones often noise, a small share of atoms are meaningless.</remarks>
public sealed record PlantedSenseModel(
    WordVectors Vectors, float[] Atoms, int AtomCount, SparseCodes Codes, long[] Counts,
    int[] AtomTopic, int[][] WordTopics, int Topics, int[] GenericAtoms)
{
    public bool IsPolysemous(int word) => WordTopics[word].Length > 1;

    public static PlantedSenseModel Generate(int words, int dims, int atomCount, int seed = 1, double polysemousShare = 0.1,
        int atomsPerTopic = 4, double genericShare = 0.01, double noise = 0.03)
    {
        Guard.Positive(words); Guard.Positive(dims); Guard.Positive(atomCount);
        const int sparsity = 5;
        var rng = new Random(seed);
        int generic = Math.Max(1, (int)Math.Round(atomCount * genericShare));
        int topics = (atomCount - generic) / atomsPerTopic;
        if (topics < 2) throw new ArgumentException($"atoms ({atomCount}) too few for two topics of {atomsPerTopic}");
        var atoms = new float[atomCount * dims];
        var atomTopic = new int[atomCount];
        Array.Fill(atomTopic, -1);
        var centre = new float[dims];
        var g = new float[dims];
        for (int t = 0; t < topics; t++)
        {
            RandomUnit(rng, centre);
            for (int j = 0; j < atomsPerTopic; j++)
            {
                int a = t * atomsPerTopic + j;
                var row = atoms.AsSpan(a * dims, dims);
                RandomUnit(rng, g);
                if (j == 1 && t % 10 == 0)
                {
                    // A nearly parallel pair: cos ≈ 1/sqrt(1 + 0.45²) ≈ 0.91.
                    TensorPrimitives.MultiplyAdd(g, 0.45f, atoms.AsSpan((a - 1) * dims, dims), row);
                }
                else TensorPrimitives.MultiplyAdd(g, 1.1f, centre, row);
                TensorPrimitives.Multiply(row, 1f / TensorPrimitives.Norm(row), row);
                atomTopic[a] = t;
            }
        }
        int firstUnused = topics * atomsPerTopic;
        var genericAtoms = Enumerable.Range(firstUnused, atomCount - firstUnused).ToArray();
        foreach (int a in genericAtoms) RandomUnit(rng, atoms.AsSpan(a * dims, dims));

        var values = new float[(long)words * dims];
        var ids = new int[words * sparsity];
        var weights = new float[words * sparsity];
        Array.Fill(ids, -1);
        var wordTopics = new int[words][];
        var names = new string[words];
        var counts = new long[words];
        var mix = new List<(int atom, float weight)>();
        for (int w = 0; w < words; w++)
        {
            mix.Clear();
            int t1 = rng.Next(topics);
            if (rng.NextDouble() < polysemousShare)
            {
                int t2 = rng.Next(topics - 1);
                if (t2 >= t1) t2++;
                wordTopics[w] = [t1, t2];
                float wa = 0.6f + 0.4f * (float)rng.NextDouble();
                float wb = wa * (0.5f + 0.5f * (float)rng.NextDouble());
                AddFromTopic(rng, mix, t1, atomsPerTopic, wa, rng.Next(1, 3));
                AddFromTopic(rng, mix, t2, atomsPerTopic, wb, rng.Next(1, 3));
            }
            else
            {
                wordTopics[w] = [t1];
                float wa = 0.6f + 0.4f * (float)rng.NextDouble();
                AddFromTopic(rng, mix, t1, atomsPerTopic, wa, rng.Next(2, 4));
            }
            if (rng.NextDouble() < 0.5 && mix.Count < sparsity)
                mix.Add((genericAtoms[rng.Next(genericAtoms.Length)], 0.15f + 0.15f * (float)rng.NextDouble()));
            if (mix.Count < sparsity)
            {
                int other = rng.Next(topics);
                if (!wordTopics[w].Contains(other)) mix.Add((other * atomsPerTopic + rng.Next(atomsPerTopic), 0.04f + 0.06f * (float)rng.NextDouble()));
            }
            var x = values.AsSpan(w * dims, dims);
            foreach (var (a, wt) in mix) TensorPrimitives.MultiplyAdd(atoms.AsSpan(a * dims, dims), wt, x, x);
            for (int i = 0; i < dims; i++) x[i] += (float)(noise / Math.Sqrt(dims) * Gaussian(rng));
            float n = TensorPrimitives.Norm(x);
            TensorPrimitives.Multiply(x, 1f / n, x);
            mix.Sort((p, q) => q.weight.CompareTo(p.weight));
            for (int s = 0; s < mix.Count; s++) { ids[w * sparsity + s] = mix[s].atom; weights[w * sparsity + s] = mix[s].weight / n; }
            names[w] = "w" + w.ToString(System.Globalization.CultureInfo.InvariantCulture);
            counts[w] = Math.Max(1, 2_000_000 / (w + 10));
        }
        return new PlantedSenseModel(new WordVectors(names, values, dims), atoms, atomCount, new SparseCodes(words, sparsity, ids, weights),
            counts, atomTopic, wordTopics, topics, genericAtoms);
    }

    private static void AddFromTopic(Random rng, List<(int, float)> mix, int topic, int perTopic, float weight, int atoms)
    {
        var chosen = Enumerable.Range(0, perTopic).OrderBy(_ => rng.Next()).Take(atoms).ToArray();
        for (int i = 0; i < chosen.Length; i++)
            mix.Add((topic * perTopic + chosen[i], weight * (i == 0 ? 1f : 0.5f + 0.4f * (float)rng.NextDouble())));
    }

    private static void RandomUnit(Random rng, Span<float> v)
    {
        for (int i = 0; i < v.Length; i++) v[i] = (float)Gaussian(rng);
        TensorPrimitives.Multiply(v, 1f / TensorPrimitives.Norm(v), v);
    }

    /// <summary>Box–Muller standard normal.</summary>
    private static double Gaussian(Random rng)
    {
        double u = 1 - rng.NextDouble(), v = rng.NextDouble();
        return Math.Sqrt(-2 * Math.Log(u)) * Math.Cos(2 * Math.PI * v);
    }
}
