namespace SenseSplit.Bench;

public static class Program
{
    public static int Main(string[] args)
    {
        Console.Error.WriteLine("usage: sensesplit-bench <suite> (suites are added as they are written)");
        return 2;
    }
}
