namespace SenseSplit.Core.SparseCoding;

/// <summary>
/// Sparse codes of <see cref="Rows"/> vectors over a dictionary: row i uses the atoms
/// <c>AtomIds[i*Sparsity .. (i+1)*Sparsity)</c> with the matching <c>Weights</c>.
/// Unused slots hold atom id -1 and weight 0. Slots are in the order OMP chose the atoms.
/// </summary>
public sealed record SparseCodes(int Rows, int Sparsity, int[] AtomIds, float[] Weights)
{
    public ReadOnlySpan<int> AtomsOf(int row) => AtomIds.AsSpan(row * Sparsity, Sparsity);
    public ReadOnlySpan<float> WeightsOf(int row) => Weights.AsSpan(row * Sparsity, Sparsity);
}

/// <summary>Codes plus the Euclidean norm of each vector's residual x - D a.</summary>
public sealed record CodingResult(SparseCodes Codes, float[] ResidualNorms);
