using System.CommandLine;
using System.Diagnostics;
using System.Globalization;
using System.Security.Cryptography;
using System.Numerics.Tensors;
using SenseSplit.Cli.IO;
using SenseSplit.Core.SparseCoding;
using SenseSplit.Core.Vectors;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit atoms</c>: learn a dictionary of discourse atoms from word vectors and write a model folder.</summary>
public static class AtomsCommand
{
    public static Command Create(CliContext context)
    {
        var defaults = new DictionaryOptions();
        var vectors = new Option<string>("--vectors") { Description = "Word vectors: plain text (one word per line followed by its numbers; optional 'count dimension' header; .gz allowed) or a NumPy .npy matrix with --words.", Required = true };
        var words = new Option<string?>("--words") { Description = "With a .npy matrix: the words, one per line, in row order." };
        var output = new Option<string>("--out") { Description = "Model folder to write (replaced atomically if it exists).", Required = true };
        var counts = new Option<string?>("--counts") { Description = "Word frequencies ('word count' per line, or CSV word,count); kept in the model for the audit." };
        var atoms = new Option<int>("--atoms") { Description = $"Number of atoms to learn (default {defaults.Atoms}; must be below the number of words).", DefaultValueFactory = _ => defaults.Atoms };
        var sparsity = new Option<int>("--sparsity") { Description = $"Most atoms per word (default {defaults.Sparsity}).", DefaultValueFactory = _ => defaults.Sparsity };
        var rounds = new Option<int>("--rounds") { Description = $"Most learning rounds (default {defaults.MaxRounds}).", DefaultValueFactory = _ => defaults.MaxRounds };
        var tolerance = new Option<double>("--tolerance") { Description = $"Stop when the relative error improves by less than this between rounds (default {defaults.Tolerance.ToString(CultureInfo.InvariantCulture)}).", DefaultValueFactory = _ => defaults.Tolerance };
        var seed = new Option<int>("--seed") { Description = $"Random seed (default {defaults.Seed}); same seed and data give the same model.", DefaultValueFactory = _ => defaults.Seed };
        var threads = new Option<int>("--threads") { Description = "Worker threads (default 0 = all cores). Results do not depend on it.", DefaultValueFactory = _ => 0 };
        var removeTop = new Option<int>("--remove-top") { Description = "Remove the mean and this many top principal components before coding (default 0; 'all-but-the-top' postprocessing).", DefaultValueFactory = _ => 0 };

        var command = new Command("atoms", "Learn a dictionary of unit discourse atoms so that every word vector is a sparse combination of a few of them.")
        {
            vectors, words, output, counts, atoms, sparsity, rounds, tolerance, seed, threads, removeTop,
        };
        command.SetAction((parse, cancel) => Task.FromResult(Run(context, new AtomsSettings(
            parse.GetValue(vectors)!, parse.GetValue(words), parse.GetValue(output)!, parse.GetValue(counts),
            new DictionaryOptions
            {
                Atoms = parse.GetValue(atoms), Sparsity = parse.GetValue(sparsity), MaxRounds = parse.GetValue(rounds),
                Tolerance = parse.GetValue(tolerance), Seed = parse.GetValue(seed), Threads = parse.GetValue(threads),
            },
            parse.GetValue(removeTop)), cancel)));
        return command;
    }

    public sealed record AtomsSettings(string Vectors, string? Words, string Out, string? Counts, DictionaryOptions Options, int RemoveTop);

    public static int Run(CliContext context, AtomsSettings settings, CancellationToken cancel)
    {
        try
        {
            var clock = Stopwatch.StartNew();
            var (wv, notes) = VectorFileReader.Read(settings.Vectors, settings.Words);
            foreach (var m in notes.Messages) context.Warn(m);
            if (notes.ZeroRowsSkipped + notes.DuplicatesSkipped > notes.Messages.Count)
                context.Warn($"{notes.ZeroRowsSkipped} zero vectors and {notes.DuplicatesSkipped} repeated words skipped in all");
            double loadSeconds = clock.Elapsed.TotalSeconds;
            context.Err.WriteLine(string.Create(CultureInfo.InvariantCulture, $"atoms: read {wv.Count} words × {wv.Dimensions} dimensions from {settings.Vectors} in {loadSeconds:0.0}s"));

            var o = settings.Options;
            if (o.Atoms >= wv.Count)
                throw new UserFacingException($"--atoms ({o.Atoms}) must be below the number of words ({wv.Count}); try --atoms {Math.Max(1, wv.Count / 10)}", ExitCodes.Usage);
            if (o.Sparsity > o.Atoms || o.Sparsity > wv.Dimensions)
                throw new UserFacingException($"--sparsity ({o.Sparsity}) must not exceed --atoms ({o.Atoms}) or the dimensions ({wv.Dimensions})", ExitCodes.Usage);
            if (settings.RemoveTop < 0 || settings.RemoveTop >= wv.Dimensions)
                throw new UserFacingException($"--remove-top ({settings.RemoveTop}) must be between 0 and the dimensions ({wv.Dimensions}) less one", ExitCodes.Usage);

            long[]? countColumn = settings.Counts is null ? null : ReadCounts(context, settings.Counts, wv.Words);
            var values = wv.Values;
            if (settings.RemoveTop > 0) VectorPreprocessing.RemoveTopComponents(values, wv.Count, wv.Dimensions, settings.RemoveTop);
            VectorPreprocessing.NormalizeRows(values, wv.Count, wv.Dimensions);

            var progress = new ProgressDisplay(context.Err, "atoms");
            var reporter = new SyncProgress<RoundReport>(r => progress.Report(r.Round, r.MaxRounds,
                string.Create(CultureInfo.InvariantCulture, $"round {r.Round}/{r.MaxRounds}, relative error {r.RelativeError:0.0000}, {r.AtomsReplaced} atoms replaced"), force: true));
            var learnClock = Stopwatch.StartNew();
            var result = DictionaryLearner.Learn(values, wv.Count, wv.Dimensions, o, reporter, cancel);
            double learnSeconds = learnClock.Elapsed.TotalSeconds;
            if (!result.Converged)
                context.Warn($"learning stopped before converging: {result.StopReason}; the model is usable, more --rounds may lower the error");

            var manifest = new ModelManifest
            {
                VectorsFile = Path.GetFileName(settings.Vectors),
                VectorsSha256 = Sha256(settings.Vectors),
                Words = wv.Count, Dimensions = wv.Dimensions, Atoms = result.AtomCount, Sparsity = o.Sparsity, Seed = o.Seed,
                ErrorPerRound = result.ErrorPerRound.ToArray(), ReplacedPerRound = result.ReplacedPerRound.ToArray(),
                RoundsRun = result.RoundsRun, Converged = result.Converged, StopReason = result.StopReason,
                RemovedComponents = settings.RemoveTop, Tolerance = o.Tolerance, MaxRounds = o.MaxRounds,
                LoadSeconds = Math.Round(loadSeconds, 3), LearnSeconds = Math.Round(learnSeconds, 3),
                CreatedUtc = DateTime.UtcNow.ToString("yyyy-MM-ddTHH:mm:ssZ", CultureInfo.InvariantCulture),
            };
            cancel.ThrowIfCancellationRequested();
            try
            {
                ModelFolder.Write(settings.Out, new ModelContent(manifest, new WordVectors(wv.Words, values, wv.Dimensions), result.Atoms, result.AtomCount, result.Codes, countColumn));
            }
            catch (IOException ex) { throw new UserFacingException($"{settings.Out}: could not write the model folder ({ex.Message})", ExitCodes.WriteFailed); }
            catch (UnauthorizedAccessException ex) { throw new UserFacingException($"{settings.Out}: could not write the model folder ({ex.Message})", ExitCodes.WriteFailed); }
            double final = result.ErrorPerRound.Count > 0 ? result.ErrorPerRound[^1] : double.NaN;
            progress.Done(string.Create(CultureInfo.InvariantCulture,
                $"{wv.Count} words, {result.AtomCount} atoms, at most {o.Sparsity} per word; relative error {final:0.0000} after {result.RoundsRun} rounds ({(result.Converged ? "converged" : "not converged")}: {result.StopReason}); model in {settings.Out}"));
            context.Out.WriteLine(Path.GetFullPath(settings.Out));
            return ExitCodes.Ok;
        }
        catch (Exception ex) when (ex is not OperationCanceledException)
        {
            return CliApp.Report(context, ex);
        }
    }

    private static long[] ReadCounts(CliContext context, string path, string[] words)
    {
        var index = new Dictionary<string, int>(words.Length, StringComparer.Ordinal);
        for (int i = 0; i < words.Length; i++) index[words[i]] = i;
        var column = new long[words.Length];
        var seen = new bool[words.Length];
        foreach (var (word, count) in CountsReader.Read(path))
            if (index.TryGetValue(word, out int i) && !seen[i]) { column[i] = count; seen[i] = true; }
        int missing = seen.Count(s => !s);
        if (missing > 0) context.Warn($"{path}: {missing} of {words.Length} words have no count; they count as 0");
        return column;
    }

    internal static string Sha256(string path)
    {
        using var stream = File.OpenRead(path);
        return Convert.ToHexStringLower(SHA256.HashData(stream));
    }

    /// <summary>IProgress that reports on the calling thread (Progress&lt;T&gt; would post to the thread pool).</summary>
    private sealed class SyncProgress<T>(Action<T> report) : IProgress<T>
    {
        public void Report(T value) => report(value);
    }
}
