using System.Diagnostics;
using RateDeck.Decks;
using RateDeck.Expressions;

namespace RateDeck.Bench;

/// <summary>
/// Fills an N x N kernel from a compiled deck expression the way the state-space stage does:
/// one values array reused, one <see cref="CompiledExpression.Evaluate"/> per pair.
/// Target (model-deck issue): 4 million evaluations well under half a second, loop included.
/// </summary>
internal static class ExpressionBenchmark
{
    private static readonly string[] _variables = ["x", "y", "i", "j", "kT", "a", "s"];

    public static void Run(int n)
    {
        Console.WriteLine($"expression kernels, N = {n} ({(long)n * n:N0} evaluations each)");
        Measure("gaussian", "a*exp(-(x-y)^2/(2*s^2))/sqrt(2*pi*s^2)", n);
        Measure("power law", "a*(y/x)^(-5/3)*exp(-abs(x-y)/kT)", n);
        Measure("special", "a*erf(abs(x-y)/s)*gamma(1+s)/max(x, y, 1)", n);
    }

    private static void Measure(string label, string text, int n)
    {
        var kernel = ExpressionCompiler.Compile(text, new SourceSpan("bench", 1, 1), _variables);
        var output = new double[n * n];
        Fill(kernel, output, n);
        // Processor time beside wall time: on a shared machine the wall clock also counts the
        // time other processes held the cores.
        var process = Process.GetCurrentProcess();
        var cpuBefore = process.TotalProcessorTime;
        var clock = Stopwatch.StartNew();
        Fill(kernel, output, n);
        clock.Stop();
        process.Refresh();
        var cpu = process.TotalProcessorTime - cpuBefore;
        var checksum = output.Sum();
        Console.WriteLine(
            $"  {label,-16} wall {clock.Elapsed.TotalMilliseconds,7:F1} ms, cpu {cpu.TotalMilliseconds,7:F1} ms" +
            $" ({cpu.TotalNanoseconds / output.Length:F1} ns each; checksum {checksum:G6})");
    }

    private static void Fill(CompiledExpression kernel, double[] output, int n)
    {
        // x, y, i, j, then the inputs kT, a and s, as a deck's scope orders them.
        var values = new double[kernel.Variables.Count];
        values[4] = 0.7;
        values[5] = 2.0;
        values[6] = 0.3;
        for (var i = 0; i < n; i++)
        {
            values[0] = 1.0 + i * 0.01;
            values[2] = i + 1;
            for (var j = 0; j < n; j++)
            {
                values[1] = 1.0 + j * 0.01;
                values[3] = j + 1;
                output[i * n + j] = kernel.Evaluate(values);
            }
        }
    }
}
