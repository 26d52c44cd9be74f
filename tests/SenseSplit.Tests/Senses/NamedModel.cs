using System.Numerics.Tensors;
using SenseSplit.Cli.IO;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Tests.Senses;

/// <summary>
/// A small readable model built like <c>PlantedSenseModel</c>: each topic has three atoms around a shared centre; the
/// listed words of a topic (and fillers named topic+number) mix two or three of its atoms; a word listed under two topics
/// mixes atoms of both (two senses). One generic atom (random direction) is given a small weight by most words.
/// </summary>
internal static class NamedModel
{
    public static readonly Dictionary<string, string[]> DefaultTopics = new()
    {
        ["finance"] = ["bank", "loan", "credit", "deposit", "interest", "mortgage", "lender", "account"],
        ["river"] = ["bank", "river", "shore", "stream", "water", "flood", "current", "delta"],
        ["music"] = ["bass", "guitar", "drum", "melody", "chord", "song", "band", "tune"],
        ["fish"] = ["bass", "trout", "salmon", "angler", "bait", "catch", "pike", "carp"],
        ["computing"] = ["mouse", "keyboard", "screen", "cursor", "click", "laptop", "monitor", "software"],
        ["animals"] = ["mouse", "rat", "squirrel", "hamster", "rodent", "cat", "burrow", "tail"],
        ["weather"] = ["rain", "storm", "cloud", "wind", "forecast", "thunder", "snow", "sunny"],
        ["cooking"] = ["recipe", "oven", "bake", "flour", "sugar", "butter", "dough", "simmer"],
    };

    public static ModelContent Build(int dims = 40, int fillersPerTopic = 30, int seed = 3, Dictionary<string, string[]>? topics = null)
    {
        topics ??= DefaultTopics;
        const int perTopic = 3, sparsity = 5;
        var rng = new Random(seed);
        var topicNames = topics.Keys.ToArray();
        int atomCount = topicNames.Length * perTopic + 1;
        var atoms = new float[atomCount * dims];
        var centre = new float[dims];
        var g = new float[dims];
        for (int t = 0; t < topicNames.Length; t++)
        {
            Unit(rng, centre);
            for (int j = 0; j < perTopic; j++)
            {
                var row = atoms.AsSpan((t * perTopic + j) * dims, dims);
                Unit(rng, g);
                TensorPrimitives.MultiplyAdd(g, 1.1f, centre, row);
                TensorPrimitives.Multiply(row, 1f / TensorPrimitives.Norm(row), row);
            }
        }
        int generic = atomCount - 1;
        Unit(rng, atoms.AsSpan(generic * dims, dims));

        var wordTopics = new Dictionary<string, List<int>>();
        var order = new List<string>();
        for (int t = 0; t < topicNames.Length; t++)
        {
            foreach (var w in topics[topicNames[t]].Concat(Enumerable.Range(1, fillersPerTopic).Select(i => topicNames[t] + i)))
            {
                if (!wordTopics.TryGetValue(w, out var list)) { wordTopics[w] = list = []; order.Add(w); }
                list.Add(t);
            }
        }
        int n = order.Count;
        var values = new float[n * dims];
        var ids = new int[n * sparsity];
        var weights = new float[n * sparsity];
        Array.Fill(ids, -1);
        var counts = new long[n];
        for (int w = 0; w < n; w++)
        {
            var mix = new List<(int a, float wt)>();
            var ts = wordTopics[order[w]];
            foreach (int t in ts)
            {
                float main = ts.Count == 1 ? 0.8f + 0.2f * (float)rng.NextDouble() : 0.6f + 0.2f * (float)rng.NextDouble();
                var chosen = Enumerable.Range(0, perTopic).OrderBy(_ => rng.Next()).Take(ts.Count == 1 ? 2 + rng.Next(2) : 1 + rng.Next(2)).ToArray();
                for (int i = 0; i < chosen.Length; i++) mix.Add((t * perTopic + chosen[i], main * (i == 0 ? 1f : 0.5f + 0.4f * (float)rng.NextDouble())));
            }
            if (rng.NextDouble() < 0.8 && mix.Count < sparsity) mix.Add((generic, 0.2f + 0.1f * (float)rng.NextDouble()));
            var x = values.AsSpan(w * dims, dims);
            foreach (var (a, wt) in mix) TensorPrimitives.MultiplyAdd(atoms.AsSpan(a * dims, dims), wt, x, x);
            for (int i = 0; i < dims; i++) x[i] += (float)(0.03 / Math.Sqrt(dims) * (rng.NextDouble() * 2 - 1) * 1.7);
            float norm = TensorPrimitives.Norm(x);
            TensorPrimitives.Multiply(x, 1f / norm, x);
            mix.Sort((p, q) => q.wt.CompareTo(p.wt));
            for (int s = 0; s < mix.Count; s++) { ids[w * sparsity + s] = mix[s].a; weights[w * sparsity + s] = mix[s].wt / norm; }
            counts[w] = 50 + rng.Next(5000);
        }
        var manifest = new ModelManifest { VectorsFile = "named.vec", Words = n, Dimensions = dims, Atoms = atomCount, Sparsity = sparsity, Seed = seed, HasCounts = true };
        return new ModelContent(manifest, new WordVectors(order.ToArray(), values, dims), atoms, atomCount, new SparseCodes(n, sparsity, ids, weights), counts);
    }

    /// <summary>Topic of each of the first atoms (atom / 3), −1 for the generic one.</summary>
    public static int TopicOf(int atom, int topicCount) => atom / 3 < topicCount ? atom / 3 : -1;

    private static void Unit(Random rng, Span<float> v)
    {
        for (int i = 0; i < v.Length; i++)
        {
            double u = 1 - rng.NextDouble(), r = rng.NextDouble();
            v[i] = (float)(Math.Sqrt(-2 * Math.Log(u)) * Math.Cos(2 * Math.PI * r));
        }
        TensorPrimitives.Multiply(v, 1f / TensorPrimitives.Norm(v), v);
    }
}
