namespace SenseSplit.Tests.SparseCoding;

/// <summary>Seeded random matrices for the sparse-coding tests.</summary>
internal static class SparseTestData
{
    public static double Normal(Random rng)
    {
        double u1 = 1.0 - rng.NextDouble(), u2 = rng.NextDouble();
        return Math.Sqrt(-2.0 * Math.Log(u1)) * Math.Cos(2 * Math.PI * u2);
    }

    public static float[] Gaussian(Random rng, int rows, int cols)
    {
        var m = new float[rows * cols];
        for (int i = 0; i < m.Length; i++) m[i] = (float)Normal(rng);
        return m;
    }

    /// <summary>Random Gaussian dictionary with unit rows (atoms×dims).</summary>
    public static float[] UnitDictionary(Random rng, int atoms, int dims)
    {
        var d = Gaussian(rng, atoms, dims);
        NormalizeRows(d, atoms, dims);
        return d;
    }

    public static void NormalizeRows(float[] m, int rows, int cols)
    {
        for (int i = 0; i < rows; i++)
        {
            var r = m.AsSpan(i * cols, cols);
            double sq = 0;
            foreach (float v in r) sq += (double)v * v;
            float inv = (float)(1 / Math.Sqrt(sq));
            for (int j = 0; j < cols; j++) r[j] *= inv;
        }
    }

    /// <summary>x − Σ w_t d_{id_t} in double.</summary>
    public static double[] Residual(ReadOnlySpan<float> x, ReadOnlySpan<float> atoms, int dims, ReadOnlySpan<int> ids, ReadOnlySpan<float> weights)
    {
        var r = new double[dims];
        for (int j = 0; j < dims; j++) r[j] = x[j];
        for (int t = 0; t < ids.Length; t++)
        {
            if (ids[t] < 0) continue;
            for (int j = 0; j < dims; j++) r[j] -= (double)weights[t] * atoms[ids[t] * dims + j];
        }
        return r;
    }

    public static double Norm(ReadOnlySpan<double> v)
    {
        double s = 0;
        foreach (double x in v) s += x * x;
        return Math.Sqrt(s);
    }

    public static double NormF(ReadOnlySpan<float> v)
    {
        double s = 0;
        foreach (float x in v) s += (double)x * x;
        return Math.Sqrt(s);
    }
}
