using System.Runtime.CompilerServices;

namespace SenseSplit.Core;

/// <summary>Argument checks for public entry points of the numerical core. Messages give the numbers.</summary>
public static class Guard
{
    public static void Positive(int value, [CallerArgumentExpression(nameof(value))] string? name = null)
    {
        if (value <= 0) throw new ArgumentOutOfRangeException(name, value, $"{name} ({value}) must be positive");
    }

    public static void NonNegative(int value, [CallerArgumentExpression(nameof(value))] string? name = null)
    {
        if (value < 0) throw new ArgumentOutOfRangeException(name, value, $"{name} ({value}) must not be negative");
    }

    public static void AtMost(int value, int limit, string limitName, [CallerArgumentExpression(nameof(value))] string? name = null)
    {
        if (value > limit) throw new ArgumentOutOfRangeException(name, value, $"{name} ({value}) must not exceed {limitName} ({limit})");
    }

    public static void Below(int value, int limit, string limitName, [CallerArgumentExpression(nameof(value))] string? name = null)
    {
        if (value >= limit) throw new ArgumentOutOfRangeException(name, value, $"{name} ({value}) must be below {limitName} ({limit})");
    }

    public static void Length(int actual, long expected, string what, [CallerArgumentExpression(nameof(actual))] string? name = null)
    {
        if (actual != expected) throw new ArgumentException($"{what}: length {actual} does not match the expected {expected}", name);
    }

    public static void AtLeastLength(int actual, long expected, string what, [CallerArgumentExpression(nameof(actual))] string? name = null)
    {
        if (actual < expected) throw new ArgumentException($"{what}: length {actual} is shorter than the required {expected}", name);
    }

    /// <summary>Throws when any element is NaN or infinite; names the first offending row and column.</summary>
    public static void Finite(ReadOnlySpan<float> values, int columns, string what)
    {
        for (int i = 0; i < values.Length; i++)
        {
            if (!float.IsFinite(values[i]))
            {
                int row = columns > 0 ? i / columns : i;
                int col = columns > 0 ? i % columns : 0;
                throw new ArgumentException($"{what}: value at row {row}, column {col} is {values[i]} (must be finite)");
            }
        }
    }
}
