using MathNet.Numerics.LinearAlgebra;

namespace SenseSplit.Core.SparseCoding;

/// <summary>
/// Reference orthogonal matching pursuit, written for obviousness rather than speed: for one vector x (1×dims), greedily
/// pick the atom of largest |dᵀr| for the current residual r, then refit all weights by least squares on the chosen
/// support, minimise ||x − D_I a||², with MathNet.Numerics (QR, double precision), up to <c>sparsity</c> atoms.
/// </summary>
/// <remarks>
/// Y. C. Pati, R. Rezaiifar and P. S. Krishnaprasad (1993), "Orthogonal matching pursuit: recursive function approximation
/// with applications to wavelet decomposition"; J. A. Tropp and A. C. Gilbert (2007), "Signal recovery from random
/// measurements via orthogonal matching pursuit", IEEE Trans. Inf. Theory 53(12), Algorithm 3.
/// Used by the tests as the reference for <see cref="BatchOmp"/> and by the benchmark as its naive counterpart. It
/// applies the same two early stops as Batch-OMP (linear dependence, exactly representable vector) with the same
/// thresholds so that the two agree on every input, not only on generic ones.
/// </remarks>
internal sealed class PlainOmp
{
    private readonly Matrix<double> dict;
    private readonly int atomCount;
    private readonly int dims;

    /// <summary>Copies the dictionary (atomCount×dims, unit rows) into double precision once.</summary>
    public PlainOmp(ReadOnlySpan<float> atoms, int atomCount, int dims)
    {
        this.atomCount = atomCount;
        this.dims = dims;
        dict = Matrix<double>.Build.Dense(atomCount, dims);
        for (int k = 0; k < atomCount; k++)
            for (int j = 0; j < dims; j++) dict[k, j] = atoms[k * dims + j];
    }

    /// <summary>Codes one vector x (length dims): chosen atoms in selection order, their weights, and ||x − D_I a||.</summary>
    public (int[] Atoms, double[] Weights, double ResidualNorm) CodeOne(ReadOnlySpan<float> x, int sparsity)
    {
        var xv = Vector<double>.Build.Dense(dims);
        for (int i = 0; i < dims; i++) xv[i] = x[i];
        double xx = xv.DotProduct(xv);
        var support = new List<int>();
        double[] coef = [];
        var residual = xv.Clone();
        if (xx == 0) return ([], [], 0);
        while (support.Count < sparsity)
        {
            var corr = dict * residual;
            int best = -1;
            double bestAbs = 0;
            for (int k = 0; k < atomCount; k++)
            {
                if (support.Contains(k)) continue;
                double a = Math.Abs(corr[k]);
                if (a > bestAbs) { bestAbs = a; best = k; }
            }
            if (best < 0) break;
            if (support.Count > 0)
            {
                // Squared distance of the candidate to the span of the chosen atoms, by least squares.
                var sub = Matrix<double>.Build.Dense(dims, support.Count, (i, c) => dict[support[c], i]);
                var cand = dict.Row(best);
                var proj = sub * sub.QR().Solve(cand);
                double dist2 = (cand - proj).DotProduct(cand - proj);
                if (dist2 <= BatchOmp.Job.DependenceThreshold * cand.DotProduct(cand)) break;
            }
            support.Add(best);
            var a2 = Matrix<double>.Build.Dense(dims, support.Count, (i, c) => dict[support[c], i]);
            var sol = a2.QR().Solve(xv);
            coef = sol.ToArray();
            residual = xv - a2 * sol;
            if (support.Count < sparsity && residual.DotProduct(residual) <= BatchOmp.Job.ExactThreshold * xx) break;
        }
        return (support.ToArray(), coef, Math.Sqrt(residual.DotProduct(residual)));
    }
}
