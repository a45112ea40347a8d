using System.Globalization;
using RateDeck.Bench;

// Benchmarks, not tests: run in Release on a quiet machine and compare ratios on one machine.
//   dotnet run -c Release --project tests/bench/RateDeck.Bench -- eigen [--sizes 500,1000,2000] [--runs 3] [--managed-max 1000]
//   dotnet run -c Release --project tests/bench/RateDeck.Bench -- kernel-assembly [--sizes 2000]
// A new suite is one more entry in the table below.
var suites = new Dictionary<string, Action<BenchOptions>>
{
    ["eigen"] = options => EigenBench.Run(options.Sizes, options.Runs, options.ManagedMaxSize, Console.Out),
    ["expressions"] = options => ExpressionBenchmark.Run(options.Sizes.Max()),
    ["run"] = options => RunBench.Run(options.Sizes, options.Runs, withReference: true, Console.Out),
    ["run-stages"] = options => RunPhases.Run(options.Sizes.Max(), Console.Out),
    ["memory"] = options => RunBench.Run(options.Sizes, options.Runs, withReference: false, Console.Out),
    ["ladder"] = options => LadderBench.Run(options.Sizes, options.Runs, Console.Out),
    ["ladder-stages"] = options => LadderBench.Stages(BenchDecks.WriteLadder(Path.Combine(Path.GetTempPath(), $"ratedeck-bench-ladder-{options.Sizes.Max()}"), options.Sizes.Max(), outputs: 50), options.Sizes.Max(), RateDeck.LinearAlgebra.LinearAlgebraProviders.Select(null, out _), Console.Out),
    ["kernel-assembly"] = options => KernelAssemblyBenchmark.Run(options.Sizes.Max()),
    ["trial"] = options => TrialBench.Run(options.Runs, Console.Out),
    ["fit"] = options => FitBench.Run(options.Runs, Console.Out),
    ["stiff"] = options => StiffBench.Run(options.Sizes, options.Runs, Console.Out),
    ["slow-modes"] = options => StiffBench.RunSlowRates(options.Sizes, options.Runs, Console.Out),
    ["startup"] = options => StartupBench.Run(options.Runs, Console.Out),
};

if (args.Length == 0 || !suites.TryGetValue(args[0], out var suite))
{
    Console.Error.WriteLine($"usage: RateDeck.Bench <suite> [--sizes N,N,...] [--runs R] [--managed-max N]; suites: {string.Join(", ", suites.Keys)}");
    return 2;
}

suite(BenchOptions.Parse(args[1..]));
return 0;

/// <summary>Options shared by the suites.</summary>
internal sealed record BenchOptions(int[] Sizes, int Runs, int ManagedMaxSize)
{
    public static BenchOptions Parse(string[] args)
    {
        var options = new BenchOptions([500, 1000, 2000], 3, 1000);
        for (var i = 0; i + 1 < args.Length; i += 2)
        {
            options = args[i] switch
            {
                "--sizes" => options with { Sizes = args[i + 1].Split(',').Select(Integer).ToArray() },
                "--runs" => options with { Runs = Integer(args[i + 1]) },
                "--managed-max" => options with { ManagedMaxSize = Integer(args[i + 1]) },
                _ => throw new ArgumentException($"unknown option {args[i]}"),
            };
        }

        return options;
    }

    private static int Integer(string text) => int.Parse(text, CultureInfo.InvariantCulture);
}
