using SenseSplit.Core.SparseCoding;
using static SenseSplit.Tests.SparseCoding.SparseTestData;

namespace SenseSplit.Tests.SparseCoding;

public class BatchOmpTests
{
    [Fact]
    public void Encode_SparseCombinationOverGaussianDictionary_RecoversSupportAndWeights()
    {
        // J. A. Tropp and A. C. Gilbert (2007), "Signal recovery from random measurements via orthogonal matching
        // pursuit", IEEE Trans. Inf. Theory 53(12): with m Gaussian measurements of order s·ln(N) (Theorem 6), OMP
        // recovers an s-sparse signal of length N with high probability; their Fig. 1 (N = 256) shows recovery close to
        // 100% for s = 5 at m = 128 (from memory). Here the N = 256 unit columns of the 128×256 measurement matrix are the
        // atoms; every one of 200 trials must give the planted support and weights.
        const int dims = 128, atoms = 256, s = 5, trials = 200;
        var rng = new Random(11);
        var dict = UnitDictionary(rng, atoms, dims);
        var x = new float[trials * dims];
        var trueIds = new int[trials][];
        var trueW = new float[trials][];
        for (int i = 0; i < trials; i++)
        {
            trueIds[i] = Enumerable.Range(0, atoms).OrderBy(_ => rng.Next()).Take(s).ToArray();
            trueW[i] = Enumerable.Range(0, s).Select(_ => (float)((rng.Next(2) == 0 ? -1 : 1) * (0.5 + 0.5 * rng.NextDouble()))).ToArray();
            for (int t = 0; t < s; t++)
                for (int j = 0; j < dims; j++) x[i * dims + j] += trueW[i][t] * dict[trueIds[i][t] * dims + j];
        }

        var result = BatchOmp.Encode(x, trials, dims, dict, atoms, s, threads: 2);

        for (int i = 0; i < trials; i++)
        {
            var got = result.Codes.AtomsOf(i).ToArray();
            Assert.Equal(trueIds[i].Order(), got.Order());
            for (int t = 0; t < s; t++)
            {
                int slot = Array.IndexOf(got, trueIds[i][t]);
                // Weights ~1 from float correlations through a well-conditioned 5×5 Cholesky: float rounding ~1e-6.
                Assert.InRange(result.Codes.WeightsOf(i)[slot], trueW[i][t] - 1e-4f, trueW[i][t] + 1e-4f);
            }
            Assert.True(result.ResidualNorms[i] < 1e-4f, $"row {i}: residual {result.ResidualNorms[i]}");
        }
    }

    [Theory]
    [InlineData(40, 64, 8, 1, 1e-5)]
    [InlineData(33, 100, 6, 2, 1e-5)]
    [InlineData(300, 500, 5, 4, 1e-5)]  // embedding-like dimension
    // sparsity = dims = atoms: the last least-squares systems are a square random Gaussian basis, whose condition
    // number grows like dims (Edelman 1988, "Eigenvalues and condition numbers of random matrices"); float rounding of
    // ~1e-7 is amplified accordingly, hence the looser bound for this case only.
    [InlineData(17, 17, 17, 3, 1e-4)]
    public void Encode_RandomProblems_AgreesWithPlainOmp(int dims, int atoms, int sparsity, int seed, double tolerance)
    {
        // Reference: plain OMP (Pati, Rezaiifar and Krishnaprasad 1993) with least squares on the support by
        // MathNet.Numerics 5.0.0 QR in double precision (PlainOmp). Batch-OMP is algebraically the same algorithm
        // (Rubinstein, Zibulevsky and Elad 2008, §3); the gap is float rounding of correlations and Gram entries,
        // below 1e-5 relative to ||x|| for well-conditioned random problems.
        var rng = new Random(seed);
        var dict = UnitDictionary(rng, atoms, dims);
        const int rows = 30;
        var x = Gaussian(rng, rows, dims);
        var result = BatchOmp.Encode(x, rows, dims, dict, atoms, sparsity);
        var reference = new PlainOmp(dict, atoms, dims);
        for (int i = 0; i < rows; i++)
        {
            var xi = x.AsSpan(i * dims, dims);
            var (refIds, refW, refRes) = reference.CodeOne(xi, sparsity);
            double scale = NormF(xi);
            var ids = result.Codes.AtomsOf(i);
            var w = result.Codes.WeightsOf(i);
            Assert.Equal(refIds, ids[..refIds.Length].ToArray());
            for (int t = refIds.Length; t < sparsity; t++) { Assert.Equal(-1, ids[t]); Assert.Equal(0f, w[t]); }
            for (int t = 0; t < refIds.Length; t++)
                Assert.True(Math.Abs(w[t] - refW[t]) <= tolerance * scale, $"row {i} slot {t}: {w[t]} vs MathNet {refW[t]}");
            Assert.True(Math.Abs(result.ResidualNorms[i] - refRes) <= tolerance * scale, $"row {i}: residual {result.ResidualNorms[i]} vs {refRes}");
        }
    }

    [Fact]
    public void Encode_RandomVectors_ResidualOrthogonalToChosenAtomsAndAtMostSparsityAtoms()
    {
        // Property of OMP's least-squares step (common practice; Tropp and Gilbert 2007, Algorithm 3 step 4): the
        // residual is orthogonal to every selected atom.
        const int dims = 50, atoms = 120, sparsity = 7, rows = 200;
        var rng = new Random(5);
        var dict = UnitDictionary(rng, atoms, dims);
        var x = Gaussian(rng, rows, dims);
        var result = BatchOmp.Encode(x, rows, dims, dict, atoms, sparsity);
        for (int i = 0; i < rows; i++)
        {
            var ids = result.Codes.AtomsOf(i);
            Assert.True(ids.ToArray().Count(a => a >= 0) <= sparsity);
            Assert.Equal(ids.Length, ids.ToArray().Distinct().Count());
            var r = Residual(x.AsSpan(i * dims, dims), dict, dims, ids, result.Codes.WeightsOf(i));
            double scale = NormF(x.AsSpan(i * dims, dims));
            Assert.Equal(Norm(r), result.ResidualNorms[i], 1e-4 * scale);
            foreach (int a in ids)
            {
                double dot = 0;
                for (int j = 0; j < dims; j++) dot += r[j] * dict[a * dims + j];
                // Float correlations and weights: orthogonality holds to float rounding (~1e-6 relative).
                Assert.True(Math.Abs(dot) < 1e-4 * scale, $"row {i} atom {a}: residual·atom = {dot}");
            }
        }
    }

    [Fact]
    public void Encode_OneAndTwoThreads_BitwiseEqual()
    {
        const int dims = 30, atoms = 90, sparsity = 4, rows = 3000;
        var rng = new Random(8);
        var dict = UnitDictionary(rng, atoms, dims);
        var x = Gaussian(rng, rows, dims);
        var one = BatchOmp.Encode(x, rows, dims, dict, atoms, sparsity, threads: 1);
        var two = BatchOmp.Encode(x, rows, dims, dict, atoms, sparsity, threads: 2);
        Assert.Equal(one.Codes.AtomIds, two.Codes.AtomIds);
        Assert.Equal(one.Codes.Weights, two.Codes.Weights);
        Assert.Equal(one.ResidualNorms, two.ResidualNorms);
    }

    [Fact]
    public void Encode_SparserThanAllowed_StopsWhenExactlyRepresented()
    {
        // A 3-sparse vector coded with up to 8 atoms: after the 3 true atoms the residual is zero up to rounding, so the
        // remaining slots stay empty (exact-representation stop of Batch-OMP; Rubinstein et al. 2008, Algorithm 2 with
        // target error 0).
        const int dims = 64, atoms = 128;
        var rng = new Random(3);
        var dict = UnitDictionary(rng, atoms, dims);
        var x = new float[dims];
        int[] ids = [5, 77, 100];
        float[] w = [0.9f, -0.6f, 0.7f];
        for (int t = 0; t < 3; t++)
            for (int j = 0; j < dims; j++) x[j] += w[t] * dict[ids[t] * dims + j];
        var code = BatchOmp.Encode(x, 1, dims, dict, atoms, 8).Codes;
        Assert.Equal(ids, code.AtomsOf(0)[..3].ToArray().Order());
        Assert.Equal([-1, -1, -1, -1, -1], code.AtomsOf(0)[3..].ToArray());
        Assert.Equal([0f, 0f, 0f, 0f, 0f], code.WeightsOf(0)[3..].ToArray());
    }

    [Fact]
    public void Encode_CandidateInSpanOfChosenAtoms_StopsWithoutIt()
    {
        // Atoms e1, e2, u = (e1 + e2)/√2 in R³ and x = (1, 0.9, 0.2): OMP takes u (|uᵀx| = 1.34); the residual after u is
        // (0.05, −0.05, 0.2), so e1 and e2 tie exactly and rounding decides which comes second; after either, the residual
        // (0, 0, 0.2) is orthogonal to all atoms and the only candidates lie in span{u, e1}, so no third atom may be
        // added (worked by hand; linear-dependence stop of the progressive Cholesky update, Rubinstein et al. 2008).
        float h = (float)(1 / Math.Sqrt(2));
        float[] dict = [1, 0, 0, 0, 1, 0, h, h, 0];
        float[] x = [1, 0.9f, 0.2f];
        var result = BatchOmp.Encode(x, 1, 3, dict, 3, 3);
        var chosen = result.Codes.AtomsOf(0).ToArray();
        Assert.Equal(2, chosen[0]);
        Assert.Contains(chosen[1], new[] { 0, 1 });
        Assert.Equal(-1, chosen[2]);
        Assert.Equal(0.2, result.ResidualNorms[0], 1e-6);
    }

    [Fact]
    public void Encode_EdgeSizes_Handled()
    {
        // One dimension: every atom is ±1; one atom reproduces x exactly.
        var r1 = BatchOmp.Encode([2.5f], 1, 1, [1f, -1f], 2, 1);
        Assert.Equal(0, r1.Codes.AtomsOf(0)[0]);
        Assert.Equal(2.5f, r1.Codes.WeightsOf(0)[0]);
        Assert.Equal(0f, r1.ResidualNorms[0]);

        // Sparsity 1: the atom of largest |correlation| with its correlation as weight (unit atoms).
        var rng = new Random(1);
        var dict = UnitDictionary(rng, 10, 6);
        var x = Gaussian(rng, 1, 6);
        var r2 = BatchOmp.Encode(x, 1, 6, dict, 10, 1);
        var corr = Enumerable.Range(0, 10).Select(k => Enumerable.Range(0, 6).Sum(j => (double)x[j] * dict[k * 6 + j])).ToArray();
        int best = Array.IndexOf(corr, corr.MaxBy(Math.Abs));
        Assert.Equal(best, r2.Codes.AtomsOf(0)[0]);
        Assert.Equal(corr[best], r2.Codes.WeightsOf(0)[0], 1e-5);

        // Sparsity = dims: a generic vector is reproduced exactly.
        var r3 = BatchOmp.Encode(x, 1, 6, dict, 10, 6);
        Assert.True(r3.ResidualNorms[0] < 1e-3 * NormF(x), $"residual {r3.ResidualNorms[0]}");

        // Zero row: empty code, zero residual. No rows: empty result.
        var r4 = BatchOmp.Encode(new float[6], 1, 6, dict, 10, 3);
        Assert.Equal([-1, -1, -1], r4.Codes.AtomsOf(0).ToArray());
        Assert.Equal(0f, r4.ResidualNorms[0]);
        var r5 = BatchOmp.Encode([], 0, 6, dict, 10, 3);
        Assert.Empty(r5.ResidualNorms);

        // Rows not a multiple of the block size and fewer rows than threads.
        var many = Gaussian(rng, 1031, 6);
        var r6 = BatchOmp.Encode(many, 1031, 6, dict, 10, 2, threads: 2);
        var r7 = BatchOmp.Encode(many.AsSpan(1030 * 6, 6), 1, 6, dict, 10, 2, threads: 2);
        Assert.Equal(r7.Codes.AtomsOf(0).ToArray(), r6.Codes.AtomsOf(1030).ToArray());
    }

    [Fact]
    public void Encode_GivenGram_SameAsComputed()
    {
        var rng = new Random(2);
        var dict = UnitDictionary(rng, 40, 12);
        var x = Gaussian(rng, 50, 12);
        var gram = BatchOmp.ComputeGram(dict, 40, 12);
        var a = BatchOmp.Encode(x, 50, 12, dict, 40, 3, gram: gram);
        var b = BatchOmp.Encode(x, 50, 12, dict, 40, 3);
        Assert.Equal(a.Codes.AtomIds, b.Codes.AtomIds);
        Assert.Equal(a.Codes.Weights, b.Codes.Weights);
    }

    [Fact]
    public void Encode_BadArguments_MessagesGiveNumbers()
    {
        var rng = new Random(4);
        var dict = UnitDictionary(rng, 8, 16);
        var x = Gaussian(rng, 2, 16);
        var e1 = Assert.Throws<ArgumentOutOfRangeException>(() => BatchOmp.Encode(x, 2, 16, dict, 8, 12));
        Assert.Contains("sparsity (12) must not exceed atoms (8)", e1.Message);
        var small = UnitDictionary(rng, 8, 4);
        var e2 = Assert.Throws<ArgumentOutOfRangeException>(() => BatchOmp.Encode(Gaussian(rng, 1, 4), 1, 4, small, 8, 5));
        Assert.Contains("sparsity (5) must not exceed dimensions (4)", e2.Message);
        var e3 = Assert.Throws<ArgumentException>(() => BatchOmp.Encode(x, 3, 16, dict, 8, 2));
        Assert.Contains("length 32 does not match the expected 48", e3.Message);
        var bad = (float[])x.Clone();
        bad[16 + 5] = float.NaN;
        var e4 = Assert.Throws<ArgumentException>(() => BatchOmp.Encode(bad, 2, 16, dict, 8, 2));
        Assert.Contains("row 1, column 5", e4.Message);
        var notUnit = (float[])dict.Clone();
        for (int j = 0; j < 16; j++) notUnit[3 * 16 + j] *= 2;
        var e5 = Assert.Throws<ArgumentException>(() => BatchOmp.Encode(x, 2, 16, notUnit, 8, 2));
        Assert.Contains("row 3 has length 2", e5.Message);
        var e6 = Assert.Throws<ArgumentException>(() => BatchOmp.Encode(x, 2, 16, dict, 8, 2, gram: new float[10]));
        Assert.Contains("length 10 does not match the expected 64", e6.Message);
    }
}
