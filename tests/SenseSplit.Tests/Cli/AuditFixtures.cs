using SenseSplit.Cli;

namespace SenseSplit.Tests.Cli;

/// <summary>Fixtures of tests/TestData/audit (found by walking up from the test binaries) and a temp folder per test.</summary>
internal static class AuditFixtures
{
    public static string File(string name)
    {
        for (var dir = new DirectoryInfo(AppContext.BaseDirectory); dir is not null; dir = dir.Parent)
        {
            var candidate = System.IO.Path.Combine(dir.FullName, "tests", "TestData", "audit", name);
            if (System.IO.File.Exists(candidate)) return candidate;
        }
        throw new FileNotFoundException($"fixture tests/TestData/audit/{name} not found above {AppContext.BaseDirectory}");
    }

    public static string TempDir()
    {
        var dir = System.IO.Path.Combine(System.IO.Path.GetTempPath(), "sensesplit-audit-tests", Guid.NewGuid().ToString("N"));
        Directory.CreateDirectory(dir);
        return dir;
    }

    public static (CliContext context, StringWriter output, StringWriter errors) Context()
    {
        var o = new StringWriter();
        var e = new StringWriter();
        return (new CliContext(o, e), o, e);
    }
}
