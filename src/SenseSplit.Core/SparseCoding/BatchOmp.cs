namespace SenseSplit.Core.SparseCoding;

public static class BatchOmp
{
    /// <summary>Codes each row of <paramref name="vectors"/> (rows×dims) with at most <paramref name="sparsity"/> atoms of
    /// <paramref name="atoms"/> (atomCount×dims, unit rows). <paramref name="gram"/> (atomCount×atomCount) is computed when null.</summary>
    public static CodingResult Encode(ReadOnlySpan<float> vectors, int rows, int dims, ReadOnlySpan<float> atoms, int atomCount,
        int sparsity, int threads = 0, float[]? gram = null)
        => throw new NotImplementedException("Batch-OMP is being written");
}
