namespace SenseSplit.Core.Senses.MergeTest;

/// <summary>
/// Two unrelated words to be merged into one pseudo-word: <see cref="FrequentWord"/> (w1, count f1) and
/// <see cref="RareWord"/> (w2, count f2 ≤ f1). <see cref="Ratio"/> is r = f1/f2 ≥ 1. Indices are rows of the
/// embedding the pair was chosen from; <see cref="Cosine"/> is the cosine of the two word vectors there.
/// </summary>
public sealed record MergePair(
    string FrequentWord, string RareWord,
    long FrequentCount, long RareCount,
    int FrequentIndex, int RareIndex,
    double Cosine)
{
    public double Ratio => (double)FrequentCount / RareCount;
}
