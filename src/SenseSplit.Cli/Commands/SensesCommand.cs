using System.CommandLine;
using System.Text.Encodings.Web;
using System.Text.Json;
using SenseSplit.Cli.IO;
using SenseSplit.Cli.Reports;
using SenseSplit.Core.Senses;

namespace SenseSplit.Cli.Commands;

/// <summary><c>sensesplit senses</c>: show the senses of one term.</summary>
public static class SensesCommand
{
    public static Command Create(CliContext context)
    {
        var command = new Command("senses", "Show the senses of one term.");
        var term = new Argument<string>("term") { Description = "The term (one or more words)." };
        var model = new Option<string>("--model") { Description = "Model folder written by 'sensesplit atoms'.", Required = true };
        var json = new Option<bool>("--json") { Description = "Print the term as one JSON object (the senses.jsonl layout)." };
        var neighbours = new Option<int>("--neighbours") { Description = "Neighbour words listed per sense.", DefaultValueFactory = _ => 10 };
        var vectors = new Option<string?>("--vectors") { Description = "Vectors file the model should have been learned from (checked by SHA-256)." };
        command.Arguments.Add(term);
        foreach (var o in new Option[] { model, json, neighbours, vectors }) command.Options.Add(o);
        command.SetAction(parse =>
        {
            var settings = new AuditSettings { Neighbours = parse.GetValue(neighbours) };
            AuditCommand.Validate(settings);
            var content = AuditInputs.LoadModel(parse.GetValue(model)!, parse.GetValue(vectors));
            return Execute(content, parse.GetValue(term)!, parse.GetValue(json), settings, context);
        });
        return command;
    }

    /// <summary>Prints one term's senses to <see cref="CliContext.Out"/>; returns the exit code.</summary>
    public static int Execute(ModelContent content, string term, bool json, AuditSettings settings, CliContext context)
    {
        if (string.IsNullOrWhiteSpace(term)) throw new UserFacingException("the term is empty", ExitCodes.Usage);
        var model = AuditInputs.BuildSenseModel(content, AuditCommand.Options(settings));
        var result = model.Analyze(TermQuery.From(term));
        if (json)
        {
            using var buffer = new MemoryStream();
            using (var w = new Utf8JsonWriter(buffer, new JsonWriterOptions { Encoder = JavaScriptEncoder.UnsafeRelaxedJsonEscaping }))
                JsonReports.WriteTerm(w, model, result, null);
            context.Out.WriteLine(System.Text.Encoding.UTF8.GetString(buffer.ToArray()));
        }
        else TextReport.WriteTerm(model, result, context.Out);
        return ExitCodes.Ok;
    }
}
