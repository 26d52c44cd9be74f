using System.Numerics.Tensors;
using SenseSplit.Core.Senses;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Tests.Senses;

public class AtomCatalogTests
{
    private static (WordVectors v, float[] atoms, SparseCodes codes) Random(int n, int d, int k, int seed)
    {
        var rng = new Random(seed);
        float[] Rows(int rows)
        {
            var a = new float[rows * d];
            for (int i = 0; i < a.Length; i++) a[i] = (float)(rng.NextDouble() * 2 - 1);
            for (int r = 0; r < rows; r++) { var s = a.AsSpan(r * d, d); TensorPrimitives.Multiply(s, 1f / TensorPrimitives.Norm(s), s); }
            return a;
        }
        var words = Enumerable.Range(0, n).Select(i => "w" + i).ToArray();
        var ids = new int[n * 2];
        var weights = new float[n * 2];
        for (int i = 0; i < n; i++) { ids[2 * i] = rng.Next(k); ids[2 * i + 1] = -1; weights[2 * i] = 0.5f; }
        return (new WordVectors(words, Rows(n), d), Rows(k), new SparseCodes(n, 2, ids, weights));
    }

    [Theory]
    [InlineData(1, 7, 3, 1)]
    [InlineData(300, 17, 9, 37)]   // block size not dividing the word count
    [InlineData(257, 33, 16, 2048)]
    public void Build_Labels_EqualBruteForceTopK(int n, int d, int k, int block)
    {
        var (v, atoms, codes) = Random(n, d, k, n + d);
        var cat = AtomCatalog.Build(v, atoms, k, codes, null, new AtomNamingOptions { LabelWords = 5, BlockWords = block });
        for (int a = 0; a < k; a++)
        {
            // Reference: score every word with a scalar dot product and sort (ties by lower index).
            var expected = Enumerable.Range(0, n).Select(w => (w, c: ScalarDot(atoms.AsSpan(a * d, d), v.Row(w))))
                .OrderByDescending(x => x.c).ThenBy(x => x.w).Take(5).Select(x => x.w).ToArray();
            Assert.Equal(expected, cat.LabelOf(a)[..expected.Length].ToArray());
            for (int i = expected.Length; i < 5; i++) Assert.Equal(-1, cat.LabelOf(a)[i]);
            Assert.Equal(AtomCatalog.MeanPairwiseCosine(v, expected), cat.Coherence[a], 5);
        }
    }

    [Fact]
    public void Build_ThreadCount_DoesNotChangeResult()
    {
        var (v, atoms, codes) = Random(500, 24, 12, 9);
        var one = AtomCatalog.Build(v, atoms, 12, codes, null, new AtomNamingOptions { Threads = 1, BlockWords = 64 });
        var two = AtomCatalog.Build(v, atoms, 12, codes, null, new AtomNamingOptions { Threads = 2, BlockWords = 64 });
        Assert.Equal(one.Labels, two.Labels);
        Assert.Equal(one.Coherence, two.Coherence);
    }

    [Fact]
    public void Build_MinCount_KeepsRareWordsOutOfLabels()
    {
        var (v, atoms, codes) = Random(200, 16, 4, 11);
        var counts = Enumerable.Range(0, 200).Select(i => (long)(i % 2 == 0 ? 3 : 30)).ToArray();
        var cat = AtomCatalog.Build(v, atoms, 4, codes, counts, new AtomNamingOptions { MinCount = 10 });
        Assert.All(cat.Labels, w => Assert.True(w < 0 || w % 2 == 1));
    }

    [Fact]
    public void Build_UsageCountsNonZeroWeights()
    {
        var (v, atoms, codes) = Random(100, 8, 5, 2);
        var cat = AtomCatalog.Build(v, atoms, 5, codes, null);
        for (int a = 0; a < 5; a++) Assert.Equal(codes.AtomIds.Count(id => id == a), cat.Usage[a]);
    }

    [Fact]
    public void Build_PlantedModel_FlagsThePlantedGenericAtomsOnly()
    {
        var (p, model) = SenseModelTests.Shared.Value;
        var generic = Enumerable.Range(0, p.AtomCount).Where(model.Catalog.IsGeneric).ToArray();
        Assert.Equal(p.GenericAtoms, generic);
        // Topic atoms are coherent (their nearest words mix them); the share flagged diffuse stays small
        // (Arora et al. 2018, TACL 6, §5 report about 5% meaningless atoms on real vectors; common practice).
        int diffuse = Enumerable.Range(0, p.AtomCount).Count(a => p.AtomTopic[a] >= 0 && model.Catalog.IsDiffuse(a));
        Assert.True(diffuse <= 0.05 * p.AtomCount, $"{diffuse} topic atoms flagged diffuse");
        // Labels of a topic atom are words of its topic.
        int right = 0, total = 0;
        for (int a = 0; a < p.AtomCount; a++)
        {
            if (p.AtomTopic[a] < 0) continue;
            foreach (int w in model.Catalog.LabelOf(a)) { total++; if (w >= 0 && p.WordTopics[w].Contains(p.AtomTopic[a])) right++; }
        }
        Assert.True(right >= 0.95 * total, $"{right}/{total} label words from the atom's topic");
    }

    [Fact]
    public void Build_MismatchedShapes_Throws()
    {
        var (v, atoms, codes) = Random(10, 4, 3, 1);
        Assert.Throws<ArgumentException>(() => AtomCatalog.Build(v, atoms.AsSpan(0, 8), 3, codes, null));
        Assert.Throws<ArgumentException>(() => AtomCatalog.Build(v, atoms, 3, codes, new long[3]));
    }

    private static float ScalarDot(ReadOnlySpan<float> a, ReadOnlySpan<float> b)
    {
        float s = 0;
        for (int i = 0; i < a.Length; i++) s += a[i] * b[i];
        return s;
    }
}
