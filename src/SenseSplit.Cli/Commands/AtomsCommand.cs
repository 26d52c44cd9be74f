using System.CommandLine;
using System.Globalization;
using System.Reflection;
using MathNet.Numerics.LinearAlgebra;
using SenseSplit.Cli.IO;
using SenseSplit.Core.Linalg;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.Commands;

/// <summary>Everything <c>sensesplit atoms</c> was asked to do, after parsing.</summary>
internal sealed record AtomsSettings(string Vectors, string Out, string? Words, string? Counts, DictionaryOptions Dictionary, int RemoveTop);

/// <summary><c>sensesplit atoms</c>: learn a dictionary of discourse atoms from word vectors.</summary>
public static class AtomsCommand
{
    public static Command Create(CliContext context)
    {
        var options = new AtomsOptions();
        var command = new Command("atoms", "Learn a dictionary of unit discourse atoms so that every word vector is a sparse combination of a few of them.");
        foreach (var o in options.All) command.Options.Add(o);
        command.SetAction(parse =>
        {
            var settings = options.Bind(parse);
            using var interrupt = new ProgressInterrupt();
            return Run(settings, context, ProgressDisplay.For(context), interrupt.Token);
        });
        return command;
    }

    /// <summary>Parses an atoms command line into settings without running anything (for tests and tooling).</summary>
    internal static AtomsSettings ParseSettings(params string[] args)
    {
        var options = new AtomsOptions();
        var command = new Command("atoms");
        foreach (var o in options.All) command.Options.Add(o);
        var parse = command.Parse(args);
        if (parse.Errors.Count > 0)
            throw new UserFacingException(string.Join("; ", parse.Errors.Select(e => e.Message)), ExitCodes.Usage);
        return options.Bind(parse);
    }

    private sealed class AtomsOptions
    {
        private static readonly DictionaryOptions Defaults = new();

        public readonly Option<string> Vectors = new("--vectors")
        { HelpName = "FILE",
            Description = "Word vectors: plain text (one word and its numbers per line, optional 'count dimension' first line, optionally gzip-compressed) or a NumPy .npy matrix (float32/float64) with --words.",
            Required = true,
        };
        public readonly Option<string> Out = new("--out")
        { HelpName = "DIR",
            Description = "Model folder to write (created, or replaced if it is an existing model folder; written completely before it replaces anything).",
            Required = true,
        };
        public readonly Option<string?> Words = new("--words") { HelpName = "FILE", Description = "Words file for .npy vectors: one word per line, in row order." };
        public readonly Option<string?> Counts = new("--counts") { HelpName = "FILE", Description = "Word counts: 'word<TAB>count' lines, or CSV with a 'word,count' header. Words without a count get 0." };
        public readonly Option<int> Atoms = new("--atoms") { HelpName = "K", Description = "Number of atoms to learn.", DefaultValueFactory = _ => Defaults.Atoms };
        public readonly Option<int> Sparsity = new("--sparsity") { HelpName = "S", Description = "Most atoms per word.", DefaultValueFactory = _ => Defaults.Sparsity };
        public readonly Option<int> Rounds = new("--rounds") { HelpName = "R", Description = "Most learning rounds.", DefaultValueFactory = _ => Defaults.MaxRounds };
        public readonly Option<double> Tolerance = new("--tolerance") { HelpName = "T", Description = "Stop when the relative error improves by less than this fraction between rounds.", DefaultValueFactory = _ => Defaults.Tolerance };
        public readonly Option<int> Seed = new("--seed") { HelpName = "N", Description = "Random seed; the same seed and input give the same atoms.", DefaultValueFactory = _ => Defaults.Seed };
        public readonly Option<int> Threads = new("--threads") { HelpName = "T", Description = "Worker threads; 0 uses every core. Results do not depend on it.", DefaultValueFactory = _ => Defaults.Threads };
        public readonly Option<int> RemoveTop = new("--remove-top") { HelpName = "N", Description = "Subtract the mean vector and remove this many top principal components before learning; 0 does neither. Rows are always scaled to unit length.", DefaultValueFactory = _ => 0 };

        public Option[] All => [Vectors, Out, Words, Counts, Atoms, Sparsity, Rounds, Tolerance, Seed, Threads, RemoveTop];

        public AtomsSettings Bind(ParseResult parse) => new(
            parse.GetValue(Vectors)!, parse.GetValue(Out)!, parse.GetValue(Words), parse.GetValue(Counts),
            new DictionaryOptions
            {
                Atoms = parse.GetValue(Atoms),
                Sparsity = parse.GetValue(Sparsity),
                MaxRounds = parse.GetValue(Rounds),
                Tolerance = parse.GetValue(Tolerance),
                Seed = parse.GetValue(Seed),
                Threads = parse.GetValue(Threads),
            },
            parse.GetValue(RemoveTop));
    }

    /// <summary>Runs the command. Throws <see cref="UserFacingException"/> for bad settings or input and
    /// <see cref="OperationCanceledException"/> when cancelled; in both cases nothing is left in the output place.</summary>
    internal static int Run(AtomsSettings s, CliContext context, ProgressDisplay progress, CancellationToken cancellation)
    {
        var o = s.Dictionary;
        CheckSettings(s);
        ModelFolder.CheckTarget(s.Out);

        progress.Stage("reading vectors");
        var load = VectorFile.Read(s.Vectors, s.Words, progress.Warn, cancellation);
        var input = load.Vectors;
        long[]? wordCounts = null;
        if (s.Counts is not null)
            wordCounts = CountsFile.Align(input.Words, CountsFile.Read(s.Counts, progress.Warn), s.Counts, progress.Warn);
        progress.EndStage($"{I(input.Count)} words, {I(input.Dimensions)} dimensions ({load.Format})");
        var readTime = progress.Elapsed;

        if (o.Atoms > input.Count)
            throw new UserFacingException($"--atoms ({I(o.Atoms)}) must not exceed the number of words ({I(input.Count)} in {s.Vectors})", ExitCodes.Usage);
        if (o.Sparsity > input.Dimensions)
            throw new UserFacingException($"--sparsity ({I(o.Sparsity)}) must not exceed the dimensions ({I(input.Dimensions)} in {s.Vectors})", ExitCodes.Usage);
        if (s.RemoveTop >= input.Dimensions)
            throw new UserFacingException($"--remove-top ({I(s.RemoveTop)}) must be below the dimensions ({I(input.Dimensions)} in {s.Vectors})", ExitCodes.Usage);
        cancellation.ThrowIfCancellationRequested();

        progress.Stage("preparing vectors");
        var values = input.Values; // the reader's array is ours: prepare in place
        if (s.RemoveTop > 0)
            Preparation.RemoveMeanAndTopComponents(values, input.Count, input.Dimensions, s.RemoveTop, o.Threads);
        int zero = Preparation.NormalizeRows(values, input.Count, input.Dimensions);
        if (zero > 0)
            progress.Warn($"{I(zero)} vectors became zero after removing the top components; they stay zero and get empty codes");
        progress.EndStage(s.RemoveTop > 0 ? $"mean and {I(s.RemoveTop)} top components removed, rows scaled to unit length" : "rows scaled to unit length");
        var prepareTime = progress.Elapsed;
        cancellation.ThrowIfCancellationRequested();

        progress.Stage($"learning {I(o.Atoms)} atoms");
        var reporter = new RoundProgress(progress);
        var result = DictionaryLearner.Learn(values, input.Count, input.Dimensions, o, reporter, cancellation);
        double finalError = result.ErrorPerRound.Count > 0 ? result.ErrorPerRound[^1] : double.NaN;
        progress.EndStage($"{I(result.RoundsRun)} rounds, relative error {F(finalError)}");
        var learnTime = progress.Elapsed;
        if (!result.Converged)
            progress.Warn($"learning stopped before converging ({result.StopReason}); more --rounds or a larger --tolerance may help");

        progress.Stage("writing model");
        var manifest = new ModelManifest
        {
            VectorsFile = Path.GetFullPath(s.Vectors),
            VectorsSha256 = load.Sha256,
            VectorsFormat = load.Format,
            WordsFile = s.Words is null ? "" : Path.GetFullPath(s.Words),
            CountsFile = s.Counts is null ? "" : Path.GetFullPath(s.Counts),
            Words = input.Count,
            Dimensions = input.Dimensions,
            Atoms = result.AtomCount,
            Sparsity = result.Codes.Sparsity,
            Seed = o.Seed,
            HasCounts = wordCounts is not null,
            ErrorPerRound = [.. result.ErrorPerRound],
            ReplacedPerRound = [.. result.ReplacedPerRound],
            RoundsRun = result.RoundsRun,
            Converged = result.Converged,
            StopReason = result.StopReason,
            ToolVersion = ToolVersion(),
            CreatedUtc = DateTime.UtcNow.ToString("yyyy-MM-ddTHH:mm:ssZ", CultureInfo.InvariantCulture),
            RowsInFile = load.RowsInFile,
            ZeroRowsSkipped = load.ZeroRowsSkipped,
            DuplicateRowsSkipped = load.DuplicateRowsSkipped,
            MaxRounds = o.MaxRounds,
            Tolerance = o.Tolerance,
            Threads = o.Threads > 0 ? o.Threads : Environment.ProcessorCount,
            RemoveTop = s.RemoveTop,
            MeanRemoved = s.RemoveTop > 0,
            RowsNormalized = true,
            Timings = new ModelTimings
            {
                ReadSeconds = Math.Round(readTime.TotalSeconds, 3),
                PrepareSeconds = Math.Round((prepareTime - readTime).TotalSeconds, 3),
                LearnSeconds = Math.Round((learnTime - prepareTime).TotalSeconds, 3),
            },
        };
        var model = new ModelContent(manifest, new WordVectors(input.Words, values, input.Dimensions),
            result.Atoms, result.AtomCount, result.Codes, wordCounts);
        ModelFolder.Write(s.Out, model, cancellation);
        progress.EndStage(Path.GetFullPath(s.Out));

        progress.Summary("atoms learned", [
            ("words", I(input.Count)),
            ("dimensions", I(input.Dimensions)),
            ("atoms", I(result.AtomCount)),
            ("sparsity", I(result.Codes.Sparsity)),
            ("final error", F(finalError)),
            ("rounds", $"{I(result.RoundsRun)} of {I(o.MaxRounds)}"),
            ("stopped", result.Converged ? $"converged ({result.StopReason})" : $"not converged ({result.StopReason})"),
            ("time", ProgressDisplay.FormatSeconds(progress.Elapsed)),
            ("model", Path.GetFullPath(s.Out)),
        ]);
        context.Out.WriteLine(Path.GetFullPath(s.Out));
        return ExitCodes.Ok;
    }

    private static void CheckSettings(AtomsSettings s)
    {
        var o = s.Dictionary;
        void Fail(string message) => throw new UserFacingException(message, ExitCodes.Usage);
        if (o.Atoms < 1) Fail($"--atoms ({I(o.Atoms)}) must be at least 1");
        if (o.Sparsity < 1) Fail($"--sparsity ({I(o.Sparsity)}) must be at least 1");
        if (o.Sparsity > o.Atoms) Fail($"--sparsity ({I(o.Sparsity)}) must not exceed --atoms ({I(o.Atoms)})");
        if (o.MaxRounds < 1) Fail($"--rounds ({I(o.MaxRounds)}) must be at least 1");
        if (!(o.Tolerance >= 0) || double.IsInfinity(o.Tolerance)) Fail($"--tolerance ({o.Tolerance.ToString(CultureInfo.InvariantCulture)}) must be a finite number >= 0");
        if (o.Threads < 0) Fail($"--threads ({I(o.Threads)}) must not be negative (0 uses every core)");
        if (s.RemoveTop < 0) Fail($"--remove-top ({I(s.RemoveTop)}) must not be negative");
        if (string.IsNullOrWhiteSpace(s.Out)) Fail("--out must name a folder");
    }

    private static string ToolVersion()
        => typeof(AtomsCommand).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion
           ?? typeof(AtomsCommand).Assembly.GetName().Version?.ToString() ?? "unknown";

    private static string I(int value) => value.ToString(CultureInfo.InvariantCulture);
    private static string F(double value) => value.ToString("0.00000", CultureInfo.InvariantCulture);

    /// <summary>Feeds learning rounds to the display synchronously (Progress&lt;T&gt; would post them to the thread pool).</summary>
    private sealed class RoundProgress(ProgressDisplay display) : IProgress<RoundReport>
    {
        public void Report(RoundReport r)
            => display.Update("round", r.Round, r.MaxRounds,
                $"error {r.RelativeError.ToString("0.00000", CultureInfo.InvariantCulture)}  replaced {r.AtomsReplaced.ToString(CultureInfo.InvariantCulture)}");
    }

    /// <summary>
    /// Row preparation before learning. A stand-in for SenseSplit.Core.Vectors.VectorPreprocessing, which is not on
    /// this branch yet; the lead replaces these calls when it lands.
    /// </summary>
    internal static class Preparation
    {
        /// <summary>Scales each row of <paramref name="values"/> (rows×dims) to unit Euclidean length; the norm is
        /// accumulated in double. Zero rows stay zero; returns how many there were.</summary>
        public static int NormalizeRows(float[] values, int rows, int dims)
        {
            int zero = 0;
            for (int i = 0; i < rows; i++)
            {
                var row = values.AsSpan(i * dims, dims);
                double sum = 0;
                foreach (float v in row) sum += (double)v * v;
                if (sum == 0) { zero++; continue; }
                System.Numerics.Tensors.TensorPrimitives.Multiply(row, (float)(1.0 / Math.Sqrt(sum)), row);
            }
            return zero;
        }

        /// <summary>
        /// x_i ← (x_i − μ) − Σ_{k&lt;c} (u_kᵀ(x_i − μ)) u_k for every row x_i of the rows×dims matrix, where μ is the
        /// mean row and u_1..u_c the leading eigenvectors of the dims×dims covariance (1/rows) Σ (x_i − μ)(x_i − μ)ᵀ.
        /// </summary>
        /// <remarks>Mu and Viswanath (2018), "All-but-the-Top: Simple and Effective Postprocessing for Word
        /// Representations", ICLR, Algorithm 1. The covariance is built from row blocks transposed into dims×block
        /// panels (C += P·Pᵀ with <see cref="Gemm"/>) and summed in double; its eigenvectors come from MathNet's
        /// symmetric eigendecomposition (a small dims×dims problem).</remarks>
        public static void RemoveMeanAndTopComponents(float[] values, int rows, int dims, int components, int threads)
        {
            var mean = new double[dims];
            for (int i = 0; i < rows; i++)
            {
                var row = values.AsSpan(i * dims, dims);
                for (int j = 0; j < dims; j++) mean[j] += row[j];
            }
            var meanF = new float[dims];
            for (int j = 0; j < dims; j++) meanF[j] = (float)(mean[j] / rows);
            for (int i = 0; i < rows; i++)
            {
                var row = values.AsSpan(i * dims, dims);
                System.Numerics.Tensors.TensorPrimitives.Subtract(row, meanF, row);
            }

            const int Block = 1024;
            var panel = new float[dims * Block];
            var partial = new float[dims * dims];
            var covariance = new double[dims * dims];
            for (int start = 0; start < rows; start += Block)
            {
                int b = Math.Min(Block, rows - start);
                for (int i = 0; i < b; i++)
                    for (int j = 0; j < dims; j++)
                        panel[j * b + i] = values[(start + i) * dims + j];
                Gemm.MultiplyTransposed(panel, dims, panel, dims, b, partial, threads);
                for (int k = 0; k < covariance.Length; k++) covariance[k] += partial[k];
            }
            var matrix = Matrix<double>.Build.Dense(dims, dims, (r, c) => covariance[r * dims + c] / rows);
            var evd = matrix.Evd(MathNet.Numerics.LinearAlgebra.Symmetricity.Symmetric);
            var order = Enumerable.Range(0, dims).OrderByDescending(k => evd.EigenValues[k].Real).Take(components).ToArray();
            var top = new float[components * dims];
            for (int c = 0; c < components; c++)
                for (int j = 0; j < dims; j++)
                    top[c * dims + j] = (float)evd.EigenVectors[j, order[c]];

            for (int i = 0; i < rows; i++)
            {
                var row = values.AsSpan(i * dims, dims);
                for (int c = 0; c < components; c++)
                {
                    var u = top.AsSpan(c * dims, dims);
                    float dot = System.Numerics.Tensors.TensorPrimitives.Dot(row, u);
                    System.Numerics.Tensors.TensorPrimitives.MultiplyAdd(u, -dot, row, row);
                }
            }
        }
    }
}
