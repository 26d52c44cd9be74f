using SenseSplit.Core.SparseCoding;

namespace SenseSplit.Core.Senses;

/// <summary>
/// How often atoms are used together across all codes. With N words, c_i words giving atom i a positive weight and
/// c_ij words giving both i and j a positive weight, p_i = c_i/N, p_ij = c_ij/N and
/// NPMI(i, j) = ln(p_ij / (p_i p_j)) / (−ln p_ij), in [−1, 1]: −1 when never used together, 0 when independent,
/// 1 when every word using one uses the other.
/// </summary>
/// <remarks>Normalised PMI: G. Bouma (2009), "Normalized (Pointwise) Mutual Information in Collocation Extraction",
/// Proceedings of GSCL, eq. 4. Atoms that many words use together belong to one discourse; a polysemous word is
/// often the only one joining two discourses, so <see cref="Npmi"/> can leave one word's own code out.</remarks>
public sealed class AtomCoUsage
{
    private readonly Dictionary<long, int> _pairs;
    private readonly int[] _uses;
    public int Words { get; }
    public int AtomCount { get; }

    private AtomCoUsage(int words, int atomCount, int[] uses, Dictionary<long, int> pairs)
    {
        Words = words; AtomCount = atomCount; _uses = uses; _pairs = pairs;
    }

    /// <summary>Counts single and pairwise positive-weight uses over all rows of <paramref name="codes"/>.</summary>
    public static AtomCoUsage Build(SparseCodes codes, int atomCount)
    {
        ArgumentNullException.ThrowIfNull(codes);
        Guard.Positive(atomCount);
        var uses = new int[atomCount];
        var pairs = new Dictionary<long, int>();
        Span<int> ids = stackalloc int[Math.Max(1, codes.Sparsity)];
        for (int r = 0; r < codes.Rows; r++)
        {
            int m = Positive(codes, r, atomCount, ids);
            for (int i = 0; i < m; i++)
            {
                uses[ids[i]]++;
                for (int j = i + 1; j < m; j++)
                {
                    long key = Key(ids[i], ids[j]);
                    pairs[key] = pairs.GetValueOrDefault(key) + 1;
                }
            }
        }
        return new AtomCoUsage(codes.Rows, atomCount, uses, pairs);
    }

    /// <summary>Words giving atom <paramref name="atom"/> a positive weight.</summary>
    public int Uses(int atom) => _uses[atom];

    /// <summary>Words giving both atoms a positive weight.</summary>
    public int Together(int a, int b) => a == b ? _uses[a] : _pairs.GetValueOrDefault(Key(a, b));

    /// <summary>NPMI of two distinct atoms; <paramref name="excludeRow"/> (a row of the codes this was built from,
    /// or −1) is left out of every count, so that a word's own code cannot vouch for its own atom pairs.</summary>
    public double Npmi(int a, int b, SparseCodes? codes = null, int excludeRow = -1)
    {
        double n = Words, ca = _uses[a], cb = _uses[b], cab = Together(a, b);
        if (excludeRow >= 0 && codes is not null)
        {
            bool hasA = false, hasB = false;
            var atoms = codes.AtomsOf(excludeRow);
            var weights = codes.WeightsOf(excludeRow);
            for (int s = 0; s < atoms.Length; s++)
            {
                if (weights[s] <= 0) continue;
                if (atoms[s] == a) hasA = true;
                if (atoms[s] == b) hasB = true;
            }
            n -= 1;
            if (hasA) ca -= 1;
            if (hasB) cb -= 1;
            if (hasA && hasB) cab -= 1;
        }
        return Npmi(cab, ca, cb, n);
    }

    /// <summary>NPMI from counts (Bouma 2009, eq. 4); −1 when the pair never occurs or a count is empty.</summary>
    public static double Npmi(double together, double usesA, double usesB, double total)
    {
        if (together <= 0 || usesA <= 0 || usesB <= 0 || total <= 0) return -1;
        double pab = together / total, pa = usesA / total, pb = usesB / total;
        if (pab >= 1) return 1;
        return Math.Clamp(Math.Log(pab / (pa * pb)) / -Math.Log(pab), -1, 1);
    }

    private static long Key(int a, int b) => a < b ? ((long)a << 32) | (uint)b : ((long)b << 32) | (uint)a;

    /// <summary>Distinct atoms with positive weight in row <paramref name="r"/>.</summary>
    private static int Positive(SparseCodes codes, int r, int atomCount, Span<int> ids)
    {
        var atoms = codes.AtomsOf(r);
        var weights = codes.WeightsOf(r);
        int m = 0;
        for (int s = 0; s < atoms.Length; s++)
        {
            int id = atoms[s];
            if (id < 0 || id >= atomCount || weights[s] <= 0) continue;
            bool seen = false;
            for (int t = 0; t < m; t++) if (ids[t] == id) { seen = true; break; }
            if (!seen) ids[m++] = id;
        }
        return m;
    }
}
