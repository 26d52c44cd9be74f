using System.Numerics.Tensors;
using System.Text.Json;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.IO;

/// <summary>
/// Reads the senses of an audit back from its <c>senses.jsonl</c> (one term object per line, docs/file-formats.md), so
/// that <c>tag</c> assigns occurrences to exactly the senses the audit reported (including senses found in its corpus),
/// with the same ids. A sense vector is rebuilt as normalise(Σ weight · atom) from its <c>atom</c> and
/// <c>atom_weights</c>, as the audit built it.
/// </summary>
public static class AuditSensesFile
{
    public static IReadOnlyList<TermSenses> Read(string path, SenseModel model)
    {
        if (!File.Exists(path)) throw new UserFacingException($"{path}: senses file not found (write one with 'sensesplit audit')");
        var results = new List<TermSenses>();
        var seen = new HashSet<string>(StringComparer.Ordinal);
        int lineNo = 0;
        foreach (var line in File.ReadLines(path))
        {
            lineNo++;
            if (line.Length == 0) continue;
            string where = $"{path}:{lineNo}";
            JsonDocument doc;
            try { doc = JsonDocument.Parse(line); }
            catch (JsonException e) { throw new UserFacingException($"{where}: not a JSON object ({e.Message})"); }
            using (doc)
            {
                var root = doc.RootElement;
                if (root.ValueKind != JsonValueKind.Object || !root.TryGetProperty("term", out var termEl) || termEl.ValueKind != JsonValueKind.String)
                    throw new UserFacingException($"{where}: expected an object with a \"term\" string (a line of an audit's senses.jsonl)");
                string term = termEl.GetString()!;
                var query = TermQuery.From(term);
                if (!seen.Add(query.Key)) { continue; }
                var verdict = root.TryGetProperty("verdict", out var v) && v.ValueKind == JsonValueKind.String ? v.GetString() switch
                {
                    VerdictNames.Several => Verdict.Several,
                    VerdictNames.Single => Verdict.Single,
                    VerdictNames.Doubtful => Verdict.Doubtful,
                    VerdictNames.Unknown => Verdict.Unknown,
                    var other => throw new UserFacingException($"{where}: unknown verdict \"{other}\" for '{term}'"),
                } : throw new UserFacingException($"{where}: no \"verdict\" for '{term}'");
                var senses = new List<SenseInfo>();
                if (root.TryGetProperty("senses", out var arr) && arr.ValueKind == JsonValueKind.Array)
                {
                    foreach (var s in arr.EnumerateArray())
                        senses.Add(ReadSense(s, model, where, term));
                }
                results.Add(new TermSenses(query, verdict, 0, model.IndexOf(query.Key), false, null, senses, [], [], [], []));
            }
        }
        if (results.Count == 0) throw new UserFacingException($"{path}: no terms (empty senses file)");
        return results;
    }

    private static SenseInfo ReadSense(JsonElement s, SenseModel model, string where, string term)
    {
        if (!s.TryGetProperty("id", out var idEl) || !idEl.TryGetInt32(out int id))
            throw new UserFacingException($"{where}: a sense of '{term}' has no integer \"id\"");
        if (!s.TryGetProperty("atom", out var atomsEl) || atomsEl.ValueKind != JsonValueKind.Array
            || !s.TryGetProperty("atom_weights", out var weightsEl) || weightsEl.ValueKind != JsonValueKind.Array
            || atomsEl.GetArrayLength() != weightsEl.GetArrayLength() || atomsEl.GetArrayLength() == 0)
            throw new UserFacingException($"{where}: sense {id} of '{term}' needs \"atom\" and \"atom_weights\" arrays of the same, non-zero length");
        var atoms = new int[atomsEl.GetArrayLength()];
        var weights = new float[atoms.Length];
        var vector = new float[model.Dimensions];
        for (int i = 0; i < atoms.Length; i++)
        {
            if (!atomsEl[i].TryGetInt32(out atoms[i]) || atoms[i] < 0 || atoms[i] >= model.AtomCount)
                throw new UserFacingException($"{where}: sense {id} of '{term}' names atom {atomsEl[i]}, but the model has atoms 0–{model.AtomCount - 1} (senses file from another model?)");
            if (!weightsEl[i].TryGetDouble(out double w) || !double.IsFinite(w))
                throw new UserFacingException($"{where}: sense {id} of '{term}' has a weight that is not a finite number");
            weights[i] = (float)w;
            TensorPrimitives.MultiplyAdd(model.Atom(atoms[i]), weights[i], vector, vector);
        }
        float n = TensorPrimitives.Norm(vector);
        if (!(n > 0) || !float.IsFinite(n)) throw new UserFacingException($"{where}: sense {id} of '{term}' has a zero vector (all weights zero?)");
        TensorPrimitives.Multiply(vector, 1f / n, vector);
        bool fromCorpus = s.TryGetProperty("from_corpus", out var fc) && fc.ValueKind == JsonValueKind.True;
        return new SenseInfo(id, atoms, weights, weights.Sum(), 0, vector, [], [], [], false, "") { FromCorpus = fromCorpus };
    }
}
