using System.Globalization;
using RateDeck.LinearAlgebra;

namespace RateDeck.Bench;

/// <summary>
/// Times <see cref="ILinearAlgebra.SymmetricEigen"/> (values and vectors) for every available provider
/// on <see cref="BenchMatrices.RandomSymmetric"/>, and prints one table row per size and provider.
/// The extreme eigenvalues are printed so that the reference script's rows can be checked to be the same problem.
/// </summary>
public static class EigenBench
{
    /// <summary>Runs the suite; sizes above <paramref name="managedMaxSize"/> skip the (slow) managed provider.</summary>
    public static void Run(IReadOnlyList<int> sizes, int runs, int managedMaxSize, TextWriter output)
    {
        var providers = new List<(ILinearAlgebra Provider, string Label)> { (new ManagedLinearAlgebra(), "managed") };
        if (OpenBlasLinearAlgebra.TryLoadSystem(out var native, out var reason))
        {
            providers.Add((native, "native dsyevd"));
            providers.Add((native.WithSymmetricDriver(SymmetricEigenDriver.RelativelyRobust), "native dsyevr"));
        }

        output.WriteLine($"native: {reason}");
        output.WriteLine($"threads: {Environment.ProcessorCount} logical processors; OPENBLAS_NUM_THREADS={Show("OPENBLAS_NUM_THREADS")} OPENBLAS_CORETYPE={Show("OPENBLAS_CORETYPE")} OPENBLAS_L2_SIZE={Show("OPENBLAS_L2_SIZE")}");
        output.WriteLine($"timing: 1 warm-up each, then {runs} runs round-robin over the providers; seconds");
        output.WriteLine();
        output.WriteLine($"{"N",6}  {"provider",-15}  {"median s",10}  {"min s",10}  {"max s",10}  {"lambda_min",18}  {"lambda_max",18}");
        foreach (var n in sizes)
        {
            var a = BenchMatrices.RandomSymmetric(n);
            var timed = providers.Where(p => p.Provider is not ManagedLinearAlgebra || n <= managedMaxSize).ToArray();
            var results = new SymmetricEigenDecomposition?[timed.Length];
            var seconds = Timing.Measure(
                timed.Select((p, i) => (Action)(() => results[i] = p.Provider.SymmetricEigen(a))).ToArray(),
                warmups: 1,
                runs);
            if (timed.Length < providers.Count)
            {
                output.WriteLine($"{n,6}  {"managed",-15}  skipped (above --managed-max {managedMaxSize})");
            }

            for (var i = 0; i < timed.Length; i++)
            {
                var values = results[i]!.Values;
                output.WriteLine(string.Create(
                    CultureInfo.InvariantCulture,
                    $"{n,6}  {timed[i].Label,-15}  {Timing.Median(seconds[i]),10:F3}  {seconds[i].Min(),10:F3}  {seconds[i].Max(),10:F3}  {values[0],18:R}  {values[^1],18:R}"));
            }
        }
    }

    private static string Show(string variable) => Environment.GetEnvironmentVariable(variable) ?? "(unset)";
}
