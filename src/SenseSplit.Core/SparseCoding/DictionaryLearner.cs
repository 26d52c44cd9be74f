using System.Globalization;
using System.Numerics.Tensors;
using SenseSplit.Core.Linalg;

namespace SenseSplit.Core.SparseCoding;

/// <summary>Settings of dictionary learning. Defaults are the CLI defaults.</summary>
public sealed record DictionaryOptions
{
    public int Atoms { get; init; } = 2000;
    public int Sparsity { get; init; } = 5;
    /// <summary>Most learning rounds (coding + atom update each); the returned codes come from one more coding pass.</summary>
    public int MaxRounds { get; init; } = 30;
    /// <summary>Stop when the relative error improves by less than this (relative) between rounds. 0 runs all rounds.</summary>
    public double Tolerance { get; init; } = 1e-3;
    public int Seed { get; init; } = 1;
    /// <summary>0 means Environment.ProcessorCount.</summary>
    public int Threads { get; init; }
}

/// <summary>What one finished learning round reports (for progress displays).</summary>
public sealed record RoundReport(int Round, int MaxRounds, double RelativeError, int AtomsReplaced);

/// <summary>Learned dictionary (AtomCount×Dimensions, unit rows) and the codes of the training vectors under it.</summary>
public sealed record DictionaryResult(
    float[] Atoms, int AtomCount, int Dimensions, SparseCodes Codes,
    IReadOnlyList<double> ErrorPerRound, IReadOnlyList<int> ReplacedPerRound,
    int RoundsRun, bool Converged, string StopReason)
{
    /// <summary>||X − A·D||_F / ||X||_F of the returned codes and atoms.</summary>
    public double FinalRelativeError { get; init; }

    /// <summary>||x_i − a_i·D|| of every training vector under the returned codes and atoms.</summary>
    public float[] ResidualNorms { get; init; } = [];
}

internal enum LearningPhase { Coding, Update, Replacement, Done }

/// <summary>Sees the phases of <see cref="DictionaryLearner"/> as they start, and the atoms after each round.</summary>
internal interface ILearningObserver
{
    void Phase(int round, LearningPhase phase);
    void RoundDone(int round, ReadOnlySpan<float> atoms);
}

/// <summary>
/// Dictionary learning: for vectors X (rows×dims) find unit atoms D (atoms×dims) and codes A (rows×atoms, at most
/// <c>sparsity</c> non-zeros per row) that approximately minimise ||X − A·D||_F².
/// </summary>
/// <remarks>
/// Method: K-SVD, M. Aharon, M. Elad and A. Bruckstein (2006), "K-SVD: An algorithm for designing overcomplete
/// dictionaries for sparse representation", IEEE Trans. Signal Processing 54(11), with the "approximate K-SVD" atom
/// update and Batch-OMP coding of R. Rubinstein, M. Zibulevsky and M. Elad (2008), "Efficient implementation of the
/// K-SVD algorithm using batch orthogonal matching pursuit", Technion CS-2008-08, Algorithm 5.
/// Each round: (1) code all vectors by <see cref="BatchOmp"/> and measure the relative error; (2) update every atom in turn
/// by one power-iteration step on the residual of the vectors that use it, updating their weights too; (3) replace
/// atoms that (almost) nobody uses or that duplicate an earlier atom by the worst-represented vectors, as Aharon et al.
/// (2006, §IV-E) recommend. Atoms start as distinct random (seeded) training vectors, normalised.
/// Residuals are formed on the fly from the codes, one vector at a time; memory beyond the caller's vectors is the
/// dictionary, the atoms×atoms Gram matrix, the codes and one block of correlations per worker.
/// Deterministic for a seed and independent of the thread count (fixed row blocks; the atom update is sequential).
/// </remarks>
public static class DictionaryLearner
{
    /// <summary>Atoms whose cosine with an earlier atom exceeds this in magnitude are replaced (Rubinstein's KSVD-Box
    /// uses 0.99 as its default mutual-coherence threshold, from memory).</summary>
    internal const double DuplicateCosine = 0.99;

    /// <summary>Atoms used by fewer vectors than this are replaced (KSVD-Box default 4, from memory), but never more
    /// than a quarter of the mean use rows·sparsity/atoms, so that small problems do not replace all atoms every round.</summary>
    internal static int MinUsage(int rows, int sparsity, int atoms) =>
        (int)Math.Clamp((long)rows * sparsity / atoms / 4, 1, 4);

    /// <summary>Learns a dictionary for <paramref name="vectors"/> (rows×dims, row-major).</summary>
    public static DictionaryResult Learn(ReadOnlySpan<float> vectors, int rows, int dims, DictionaryOptions options,
        IProgress<RoundReport>? progress = null, CancellationToken cancellation = default)
        => Learn(vectors, rows, dims, options, null, DefaultKeptResiduals, progress, cancellation);

    /// <summary>Residuals E_i of an atom's users are kept for the second update pass when it has at most this many users
    /// (4096 × 300 floats = 4.9 MB); atoms with more users form them again.</summary>
    internal const int DefaultKeptResiduals = 4096;

    /// <summary>Learn with an observer of the phases (the benchmark times them; the core has no clock) and a chosen
    /// limit for kept residuals (tests run both update paths).</summary>
    internal static DictionaryResult Learn(ReadOnlySpan<float> vectors, int rows, int dims, DictionaryOptions options,
        ILearningObserver? observer, int keptResiduals, IProgress<RoundReport>? progress = null, CancellationToken cancellation = default)
    {
        ArgumentNullException.ThrowIfNull(options);
        Guard.Positive(rows);
        Guard.Positive(dims);
        Guard.Length(vectors.Length, (long)rows * dims, $"vectors ({rows}×{dims})");
        int atoms = options.Atoms, sparsity = options.Sparsity;
        Guard.Positive(atoms);
        Guard.Below(atoms, rows, "vectors");
        Guard.Positive(sparsity);
        Guard.AtMost(sparsity, atoms, "atoms");
        Guard.AtMost(sparsity, dims, "dimensions");
        int maxRounds = options.MaxRounds;
        Guard.Positive(maxRounds);
        if (!(options.Tolerance >= 0) || double.IsInfinity(options.Tolerance))
            throw new ArgumentOutOfRangeException(nameof(options), options.Tolerance,
                $"tolerance ({options.Tolerance.ToString(CultureInfo.InvariantCulture)}) must be finite and not negative");
        int threads = options.Threads;
        Guard.NonNegative(threads);
        Guard.Finite(vectors, dims, "vectors");
        return new Learner(rows, dims, options, observer, keptResiduals).Run(vectors, progress, cancellation);
    }

    private sealed class Learner(int rows, int dims, DictionaryOptions options, ILearningObserver? observer, int keptResiduals)
    {
        private readonly int k = options.Atoms;
        private readonly int s = options.Sparsity;
        private readonly int threads = BatchOmp.ResolveThreads(options.Threads);

        public unsafe DictionaryResult Run(ReadOnlySpan<float> vectors, IProgress<RoundReport>? progress, CancellationToken cancellation)
        {
            double normX2 = 0;
            int nonZero = 0;
            for (int i = 0; i < rows; i++)
            {
                double sq = SquaredNorm(vectors.Slice(i * dims, dims));
                normX2 += sq;
                if (sq > 0) nonZero++;
            }
            if (nonZero <= k)
                throw new ArgumentException(
                    $"vectors: only {nonZero} of {rows} rows are non-zero; atoms ({k}) must be below the number of non-zero rows",
                    nameof(vectors));
            double normX = Math.Sqrt(normX2);

            var atoms = InitialAtoms(vectors, nonZero);
            var gram = new float[k * k];
            Gemm.MultiplyTransposed(atoms, k, atoms, k, dims, gram, threads);
            var ids = new int[rows * s];
            var weights = new float[rows * s];
            var residual = new float[rows];
            var errors = new List<double>();
            var replacedPerRound = new List<int>();
            var scratch = new UpdateScratch(rows, k, s, dims, keptResiduals);
            var coding = BatchOmp.CreateScratch(rows, dims, k, s, threads);

            int round = 0;
            bool converged = false;
            string reason = "";
            double error;
            while (true)
            {
                round++;
                observer?.Phase(round, LearningPhase.Coding);
                BatchOmp.EncodeInto(vectors, rows, dims, atoms, k, s, gram, ids, weights, residual, threads, cancellation, coding);
                error = RelativeError(residual, normX);
                errors.Add(error);
                if (round > 1 && options.Tolerance > 0)
                {
                    double previous = errors[^2];
                    double improvement = previous > 0 ? (previous - error) / previous : 0;
                    if (improvement < options.Tolerance)
                    {
                        converged = true;
                        reason = previous > 0
                            ? string.Create(CultureInfo.InvariantCulture,
                                $"relative error improved by {improvement:G3} (below the tolerance {options.Tolerance:G3}) in round {round}")
                            : $"relative error reached zero in round {round - 1}";
                        replacedPerRound.Add(0);
                        progress?.Report(new RoundReport(round, options.MaxRounds, error, 0));
                        break; // codes were just computed for the current atoms: nothing to redo
                    }
                }
                observer?.Phase(round, LearningPhase.Update);
                UpdateAtoms(vectors, atoms, ids, weights, scratch, cancellation);
                observer?.Phase(round, LearningPhase.Replacement);
                int replaced = ReplaceAtoms(vectors, atoms, gram, ids, weights, residual, scratch, cancellation);
                replacedPerRound.Add(replaced);
                observer?.RoundDone(round, atoms);
                progress?.Report(new RoundReport(round, options.MaxRounds, error, replaced));
                if (round == options.MaxRounds)
                {
                    // The atoms changed after the last coding: code once more so the codes match the returned atoms.
                    observer?.Phase(round + 1, LearningPhase.Coding);
                    BatchOmp.EncodeInto(vectors, rows, dims, atoms, k, s, gram, ids, weights, residual, threads, cancellation, coding);
                    error = RelativeError(residual, normX);
                    reason = $"reached the maximum of {options.MaxRounds} rounds";
                    break;
                }
            }
            observer?.Phase(round, LearningPhase.Done);
            return new DictionaryResult(atoms, k, dims, new SparseCodes(rows, s, ids, weights), errors, replacedPerRound,
                round, converged, reason)
            { FinalRelativeError = error, ResidualNorms = residual };
        }

        /// <summary>k distinct non-zero training vectors chosen by a seeded partial Fisher–Yates shuffle, normalised.</summary>
        private float[] InitialAtoms(ReadOnlySpan<float> vectors, int nonZero)
        {
            var candidates = new int[nonZero];
            for (int i = 0, c = 0; i < rows; i++)
                if (SquaredNorm(vectors.Slice(i * dims, dims)) > 0) candidates[c++] = i;
            var rng = new Random(options.Seed);
            var atoms = new float[k * dims];
            for (int a = 0; a < k; a++)
            {
                int pick = a + rng.Next(nonZero - a);
                (candidates[a], candidates[pick]) = (candidates[pick], candidates[a]);
                SetNormalised(atoms.AsSpan(a * dims, dims), vectors.Slice(candidates[a] * dims, dims));
            }
            return atoms;
        }

        private static void SetNormalised(Span<float> atom, ReadOnlySpan<float> x)
        {
            float inv = (float)(1 / Math.Sqrt(SquaredNorm(x)));
            TensorPrimitives.Multiply(x, inv, atom);
        }

        private static double SquaredNorm(ReadOnlySpan<float> v)
        {
            double sq = 0;
            foreach (float f in v) sq += (double)f * f;
            return sq;
        }

        /// <summary>||X − A·D||_F / ||X||_F from the per-row residual norms, summed in row order in double.</summary>
        private static double RelativeError(float[] residual, double normX)
        {
            double sum = 0;
            foreach (float r in residual) sum += (double)r * r;
            return Math.Sqrt(sum) / normX;
        }

        private sealed class UpdateScratch(int rows, int atoms, int sparsity, int dims, int kept)
        {
            public readonly int[] Offsets = new int[atoms + 1];   // users of atom j: Entries[Offsets[j] .. Offsets[j+1])
            public readonly int[] Entries = new int[rows * sparsity]; // code slot index i·sparsity + t, rows ascending
            public readonly float[] Accumulator = new float[dims];
            public readonly float[] Partial = new float[dims];
            /// <summary>E_i of the users of the current atom when there are at most <c>kept</c> of them, so the second
            /// pass needs one dot product per user instead of s.</summary>
            public readonly float[] Residuals = new float[Math.Min(kept, rows) * dims];
            public readonly int[] Order = new int[rows];
            public readonly float[] Keys = new float[rows];
        }

        /// <summary>Builds, for every atom, the list of code slots that use it (counting sort; rows ascending).</summary>
        private void IndexUsers(int[] ids, UpdateScratch sc)
        {
            var off = sc.Offsets;
            Array.Clear(off);
            foreach (int id in ids) if (id >= 0) off[id + 1]++;
            for (int j = 0; j < k; j++) off[j + 1] += off[j];
            var fill = new int[k];
            for (int e = 0; e < ids.Length; e++)
            {
                int id = ids[e];
                if (id >= 0) sc.Entries[off[id] + fill[id]++] = e;
            }
        }

        /// <summary>
        /// Approximate K-SVD atom update (Rubinstein et al. 2008, Algorithm 5), atoms in order, each seeing the atoms and
        /// weights already updated this round. For atom j with users I and their weights g = A_{j,I}ᵀ, and
        /// E_i = x_i − Σ_{t≠j} a_{t,i} d_t the residual of user i without atom j:
        ///   d_j = Σ_i g_i E_i / ||Σ_i g_i E_i||,   then  g_i = E_iᵀ d_j.
        /// This is one power-iteration step for the top singular pair of E_I (Aharon et al. 2006, eq. 21, whose exact
        /// K-SVD step takes the full SVD). E_i is formed from the codes; it is kept for the second pass only
        /// for atoms with at most <c>keptResiduals</c> users (bounded buffer), otherwise formed again.
        /// </summary>
        private unsafe void UpdateAtoms(ReadOnlySpan<float> vectors, float[] atoms, int[] ids, float[] weights,
            UpdateScratch sc, CancellationToken cancellation)
        {
            IndexUsers(ids, sc);
            var acc = sc.Accumulator.AsSpan();
            var part = sc.Partial.AsSpan();
            for (int j = 0; j < k; j++)
            {
                if ((j & 63) == 0) cancellation.ThrowIfCancellationRequested();
                int start = sc.Offsets[j], end = sc.Offsets[j + 1];
                if (start == end) continue; // unused atom: left for replacement
                acc.Clear();
                bool keep = end - start <= keptResiduals;
                for (int p = start; p < end; p++)
                {
                    int e = sc.Entries[p];
                    int i = e / s;
                    var ei = keep ? sc.Residuals.AsSpan((p - start) * dims, dims) : part;
                    ResidualWithout(vectors.Slice(i * dims, dims), atoms, ids, weights, i, e, ei);
                    TensorPrimitives.MultiplyAdd(ei, weights[e], acc, acc);
                }
                double norm = Math.Sqrt(SquaredNorm(acc));
                // E_I g = 0: the users' residuals without atom j are orthogonal to their weights (e.g. all exactly
                // represented by the other atoms). No direction to move to; keep atom and weights.
                if (!(norm > 0)) continue;
                var dj = atoms.AsSpan(j * dims, dims);
                TensorPrimitives.Multiply(acc, (float)(1 / norm), dj);
                for (int p = start; p < end; p++)
                {
                    int e = sc.Entries[p];
                    if (keep)
                    {
                        weights[e] = TensorPrimitives.Dot(sc.Residuals.AsSpan((p - start) * dims, dims), dj);
                        continue;
                    }
                    // Too many users to keep their residuals: g_i = E_iᵀ d_j = x_iᵀ d_j − Σ_{t≠j} a_{t,i} d_tᵀ d_j.
                    int i = e / s;
                    double g = TensorPrimitives.Dot(vectors.Slice(i * dims, dims), dj);
                    for (int t = i * s, tEnd = t + s; t < tEnd; t++)
                    {
                        int id = ids[t];
                        if (t == e || id < 0) continue;
                        g -= weights[t] * TensorPrimitives.Dot(new ReadOnlySpan<float>(atoms, id * dims, dims), dj);
                    }
                    weights[e] = (float)g;
                }
            }
        }

        /// <summary>dest = x_i − Σ_{slots t of row i, t ≠ e} a_t d_{id_t}.</summary>
        private void ResidualWithout(ReadOnlySpan<float> x, float[] atoms, int[] ids, float[] weights, int row, int e, Span<float> dest)
        {
            x.CopyTo(dest);
            for (int t = row * s, tEnd = t + s; t < tEnd; t++)
            {
                int id = ids[t];
                if (t == e || id < 0) continue;
                TensorPrimitives.MultiplyAdd(new ReadOnlySpan<float>(atoms, id * dims, dims), -weights[t], dest, dest);
            }
        }

        /// <summary>
        /// Replaces atoms used by fewer than <see cref="MinUsage"/> vectors, or whose |cosine| with an earlier kept atom
        /// exceeds <see cref="DuplicateCosine"/>, by the worst-represented vectors (largest residual norm under the updated
        /// atoms and weights; distinct; normalised), as recommended by Aharon et al. (2006, §IV-E). Recomputes the Gram
        /// matrix of the updated atoms (needed for the duplicate test and by the next coding) and patches the rows and
        /// columns of the replaced atoms. Returns the number of atoms replaced.
        /// </summary>
        private unsafe int ReplaceAtoms(ReadOnlySpan<float> vectors, float[] atoms, float[] gram, int[] ids, float[] weights,
            float[] residual, UpdateScratch sc, CancellationToken cancellation)
        {
            Gemm.MultiplyTransposed(atoms, k, atoms, k, dims, gram, threads);
            int minUse = MinUsage(rows, s, k);
            var replace = new List<int>();
            var isReplaced = new bool[k];
            for (int j = 0; j < k; j++)
            {
                bool rep = sc.Offsets[j + 1] - sc.Offsets[j] < minUse;
                if (!rep)
                {
                    var gRow = new ReadOnlySpan<float>(gram, j * k, j);
                    for (int a = 0; a < j; a++)
                        if (!isReplaced[a] && Math.Abs(gRow[a]) > DuplicateCosine) { rep = true; break; }
                }
                if (rep) { isReplaced[j] = true; replace.Add(j); }
            }
            if (replace.Count == 0) return 0;

            ResidualNorms(vectors, atoms, ids, weights, residual, cancellation);
            // Worst-represented first; ties by row so the order is fully determined. Rows represented exactly (zero
            // residual, including zero rows) are never used: they would add nothing the dictionary lacks.
            int candidates = 0;
            for (int i = 0; i < rows; i++)
                if (residual[i] > 0) { sc.Order[candidates] = i; sc.Keys[candidates] = residual[i]; candidates++; }
            var order = sc.Order.AsSpan(0, candidates);
            var keys = sc.Keys.AsSpan(0, candidates);
            keys.Sort(order, (a, b) => b.CompareTo(a));
            // Equal keys may come out in any (but deterministic) order from the introsort; make ties row-ascending.
            for (int lo = 0; lo < candidates;)
            {
                int hi = lo + 1;
                while (hi < candidates && keys[hi] == keys[lo]) hi++;
                if (hi - lo > 1) order[lo..hi].Sort();
                lo = hi;
            }

            int count = Math.Min(replace.Count, candidates);
            replace.RemoveRange(count, replace.Count - count); // not enough candidates: keep the rest as they are
            if (count == 0) return 0;
            var newRows = new float[count * dims];
            for (int r = 0; r < count; r++)
            {
                SetNormalised(atoms.AsSpan(replace[r] * dims, dims), vectors.Slice(order[r] * dims, dims));
                atoms.AsSpan(replace[r] * dims, dims).CopyTo(newRows.AsSpan(r * dims, dims));
            }
            // Patch G: rows and columns of the replaced atoms from one product of the new atoms with all atoms.
            var patch = new float[count * k];
            Gemm.MultiplyTransposed(newRows, count, atoms, k, dims, patch, threads);
            for (int r = 0; r < count; r++)
            {
                int j = replace[r];
                patch.AsSpan(r * k, k).CopyTo(gram.AsSpan(j * k, k));
                for (int a = 0; a < k; a++) gram[a * k + j] = patch[r * k + a];
            }
            return count;
        }

        /// <summary>residual[i] = ||x_i − a_i·D|| for all rows under the current codes, over fixed row blocks.</summary>
        private unsafe void ResidualNorms(ReadOnlySpan<float> vectors, float[] atoms, int[] ids, float[] weights,
            float[] residual, CancellationToken cancellation)
        {
            int block = BatchOmp.BlockRows(rows);
            int blocks = (rows + block - 1) / block;
            fixed (float* xp = vectors)
            {
                float* x = xp;
                Parallel.For(0, blocks, new ParallelOptions { MaxDegreeOfParallelism = threads, CancellationToken = cancellation }, b =>
                {
                    var tmp = new float[dims];
                    int end = Math.Min(rows, (b + 1) * block);
                    for (int i = b * block; i < end; i++)
                    {
                        ResidualWithout(new ReadOnlySpan<float>(x + (long)i * dims, dims), atoms, ids, weights, i, -1, tmp);
                        residual[i] = (float)Math.Sqrt(SquaredNorm(tmp));
                    }
                });
            }
        }
    }
}
