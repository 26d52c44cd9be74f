using System.Reflection;

namespace SenseSplit.Bench;

/// <summary>A benchmark suite; every non-abstract implementation in this assembly is found by reflection.</summary>
public interface IBenchSuite
{
    string Name { get; }
    string Description { get; }
    /// <summary>Runs the suite, printing figures to stdout; returns an exit code.</summary>
    int Run(string[] args);
}

public static class Program
{
    public static int Main(string[] args)
    {
        var suites = typeof(Program).Assembly.GetTypes()
            .Where(t => typeof(IBenchSuite).IsAssignableFrom(t) && t is { IsAbstract: false, IsInterface: false })
            .Select(t => (IBenchSuite)Activator.CreateInstance(t)!)
            .OrderBy(s => s.Name, StringComparer.Ordinal)
            .ToList();
        var chosen = args.Length > 0 ? suites.FirstOrDefault(s => s.Name == args[0]) : null;
        if (chosen is null)
        {
            Console.Error.WriteLine("usage: sensesplit-bench <suite> [options]");
            foreach (var s in suites) Console.Error.WriteLine($"  {s.Name,-10} {s.Description}");
            return 2;
        }
        Console.WriteLine($"# {chosen.Name} | {Environment.ProcessorCount} cores | {System.Runtime.InteropServices.RuntimeInformation.ProcessArchitecture} | .NET {Environment.Version} | {DateTime.UtcNow:yyyy-MM-dd HH:mm} UTC");
        return chosen.Run(args[1..]);
    }
}
