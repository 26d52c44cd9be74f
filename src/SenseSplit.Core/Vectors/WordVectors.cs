namespace SenseSplit.Core.Vectors;

/// <summary>An embedding: one row of <see cref="Dimensions"/> floats per word, row-major in <see cref="Values"/>.</summary>
public sealed record WordVectors(string[] Words, float[] Values, int Dimensions)
{
    public int Count => Words.Length;
    public ReadOnlySpan<float> Row(int i) => Values.AsSpan(i * Dimensions, Dimensions);
}
