using System.Globalization;
using System.Text;
using System.Text.Json;
using CsvHelper;
using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Vectors;
using SenseSplit.Tests.Senses.MergeTest;

namespace SenseSplit.Tests.Cli;

/// <summary>Seeded inputs for the merge-test command tests: synthetic corpora and vector files with known merges.</summary>
internal static class MergeTestFixtures
{
    /// <summary>64 made-up words of two syllables, most frequent first.</summary>
    public static readonly string[] Words = BuildWords();

    private static string[] BuildWords()
    {
        string[] syllables = ["ka", "lo", "mi", "nu", "pe", "ri", "so", "tu"];
        return syllables.SelectMany(a => syllables.Select(b => a + b)).ToArray();
    }

    /// <summary>
    /// A corpus of sentences over <see cref="Words"/> with Zipf-like frequencies (weight of rank k ∝ 1/(k+1)^1.1): first
    /// words capitalised, some commas, a full stop, one sentence per line, a blank line every eight sentences, and now
    /// and then a number. Sentences draw from one of four "topics" (a quarter of the words weighted up), so vectors
    /// carry some structure.
    /// </summary>
    public static string Corpus(int seed, int sentences)
    {
        var rng = new Random(seed);
        int n = Words.Length;
        var topicWeights = new double[4][];
        for (int t = 0; t < 4; t++)
        {
            topicWeights[t] = new double[n];
            for (int k = 0; k < n; k++) topicWeights[t][k] = 1 / Math.Pow(k + 1, 1.1) * (k % 4 == t ? 4 : 1);
        }
        var sb = new StringBuilder();
        for (int s = 0; s < sentences; s++)
        {
            var w = topicWeights[rng.Next(4)];
            double total = w.Sum();
            int length = 5 + rng.Next(8);
            for (int i = 0; i < length; i++)
            {
                double u = rng.NextDouble() * total;
                int k = 0;
                while (k < n - 1 && (u -= w[k]) > 0) k++;
                string word = Words[k];
                if (i == 0) word = char.ToUpperInvariant(word[0]) + word[1..];
                if (i > 0) sb.Append(' ');
                sb.Append(word);
                if (i < length - 1 && rng.Next(10) == 0) sb.Append(',');
                if (rng.Next(200) == 0) sb.Append(" 3.14");
            }
            sb.Append(".\n");
            if (s % 8 == 7) sb.Append('\n');
        }
        return sb.ToString();
    }

    /// <summary>A random orthogonal matrix (dims×dims, row-major): the Q factor of a Gaussian matrix (MathNet QR).</summary>
    public static float[] RandomRotation(Random rng, int dims)
    {
        var g = Matrix<double>.Build.Dense(dims, dims, (_, _) => MergeTestData.Gaussian(rng));
        var q = g.QR().Q;
        var r = new float[dims * dims];
        for (int i = 0; i < dims; i++)
            for (int j = 0; j < dims; j++) r[i * dims + j] = (float)q[i, j];
        return r;
    }

    /// <summary>x·R for a row vector x.</summary>
    public static float[] Rotate(ReadOnlySpan<float> x, float[] rotation, int dims)
    {
        var y = new double[dims];
        for (int i = 0; i < dims; i++)
            for (int j = 0; j < dims; j++) y[j] += (double)x[i] * rotation[i * dims + j];
        return y.Select(v => (float)v).ToArray();
    }

    public sealed record KnownMerge(string First, string Second, string Pseudo, long F1, long F2, double Alpha, double Beta);

    /// <summary>
    /// Writes original.txt (background words and pair words, Gaussian vectors), merged.txt (the background words and a
    /// pseudo-word α·v1 + β·v2 per pair, all rotated by one random orthogonal matrix), counts.tsv and pairs.csv into
    /// <paramref name="dir"/>. β/α = <paramref name="weightRatio"/>(r), r log-uniform over [1, 1000]. With noise t > 0,
    /// each merged-file vector x gets a Gaussian direction of norm t·||x|| added before the rotation (background words
    /// <paramref name="backgroundNoise"/>, pseudo-words <paramref name="pseudoNoise"/>), a stand-in for retraining noise:
    /// a background word then comes back at cosine about 1/√(1 + t²) to itself.
    /// </summary>
    public static List<KnownMerge> WriteKnownMerge(string dir, int seed, int pairs, int background, int dims, Func<double, double> weightRatio,
        double backgroundNoise = 0, double pseudoNoise = 0)
    {
        var rng = new Random(seed);
        var words = new List<string>();
        var values = new List<float>();
        var counts = new List<long>();
        var mergedWords = new List<string>();
        var mergedValues = new List<float>();
        var rotation = RandomRotation(rng, dims);
        float[] Gaussian() => Enumerable.Range(0, dims).Select(_ => (float)MergeTestData.Gaussian(rng)).ToArray();
        float[] Noisy(float[] x, double t)
        {
            if (t == 0) return x;
            var n = Gaussian();
            double scale = t * Math.Sqrt(x.Sum(a => (double)a * a) / n.Sum(a => (double)a * a));
            return x.Select((a, j) => (float)(a + scale * n[j])).ToArray();
        }
        for (int i = 0; i < background; i++)
        {
            var v = Gaussian();
            words.Add($"bg{i}"); values.AddRange(v); counts.Add(100 + rng.Next(1000));
            mergedWords.Add($"bg{i}"); mergedValues.AddRange(Rotate(Noisy(v, backgroundNoise), rotation, dims));
        }
        var known = new List<KnownMerge>();
        for (int p = 0; p < pairs; p++)
        {
            double r = Math.Pow(10, 3 * rng.NextDouble());
            long f2 = 20 + rng.Next(80);
            long f1 = Math.Max(f2, (long)Math.Round(f2 * r));
            double ratio = (double)f1 / f2;
            double alpha = 0.5 + 1.5 * rng.NextDouble();
            double beta = alpha * weightRatio(ratio);
            var v1 = Gaussian();
            var v2 = Gaussian();
            string a = $"fa{p}", b = $"ra{p}", pseudo = $"fa{p}⊕ra{p}";
            words.Add(a); values.AddRange(v1); counts.Add(f1);
            words.Add(b); values.AddRange(v2); counts.Add(f2);
            var m = new float[dims];
            for (int j = 0; j < dims; j++) m[j] = (float)(alpha * v1[j] + beta * v2[j]);
            mergedWords.Add(pseudo); mergedValues.AddRange(Rotate(Noisy(m, pseudoNoise), rotation, dims));
            known.Add(new KnownMerge(a, b, pseudo, f1, f2, alpha, beta));
        }
        VectorFile.WriteText(Path.Combine(dir, "original.txt"), new WordVectors([.. words], [.. values], dims));
        VectorFile.WriteText(Path.Combine(dir, "merged.txt"), new WordVectors([.. mergedWords], [.. mergedValues], dims));
        File.WriteAllLines(Path.Combine(dir, "counts.tsv"), words.Select((w, i) => $"{w}\t{counts[i].ToString(CultureInfo.InvariantCulture)}"));
        // The rare word first on some lines: the command must put the more frequent one first itself.
        File.WriteAllLines(Path.Combine(dir, "pairs.csv"), ["w1,w2,pseudo", .. known.Select((k, i) => i % 3 == 0 ? $"{k.Second},{k.First},{k.Pseudo}" : $"{k.First},{k.Second},{k.Pseudo}")]);
        return known;
    }

    /// <summary>The rows of a results pairs.csv, by column name.</summary>
    public static List<Dictionary<string, string>> ReadCsv(string path)
    {
        using var reader = new StreamReader(path);
        using var csv = new CsvReader(reader, CultureInfo.InvariantCulture);
        csv.Read();
        csv.ReadHeader();
        var header = csv.HeaderRecord!;
        var rows = new List<Dictionary<string, string>>();
        while (csv.Read()) rows.Add(header.ToDictionary(h => h, h => csv.GetField(h) ?? ""));
        return rows;
    }

    public static double D(string s) => double.Parse(s, CultureInfo.InvariantCulture);

    public static JsonElement Json(string path) => JsonDocument.Parse(File.ReadAllBytes(path)).RootElement;
}
