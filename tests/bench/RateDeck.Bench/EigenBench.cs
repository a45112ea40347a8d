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
        output.WriteLine($"timing: 1 warm-up, median of {runs} runs, seconds");
        output.WriteLine();
        output.WriteLine($"{"N",6}  {"provider",-15}  {"median s",10}  {"min s",10}  {"max s",10}  {"lambda_min",18}  {"lambda_max",18}");
        foreach (var n in sizes)
        {
            var a = BenchMatrices.RandomSymmetric(n);
            foreach (var (provider, label) in providers)
            {
                if (provider is ManagedLinearAlgebra && n > managedMaxSize)
                {
                    output.WriteLine($"{n,6}  {label,-15}  skipped (above --managed-max {managedMaxSize})");
                    continue;
                }

                SymmetricEigenDecomposition? result = null;
                var seconds = Timing.Measure(() => result = provider.SymmetricEigen(a), warmups: 1, runs);
                var values = result!.Values;
                output.WriteLine(string.Create(
                    CultureInfo.InvariantCulture,
                    $"{n,6}  {label,-15}  {Timing.Median(seconds),10:F3}  {seconds.Min(),10:F3}  {seconds.Max(),10:F3}  {values[0],18:R}  {values[^1],18:R}"));
            }
        }
    }

    private static string Show(string variable) => Environment.GetEnvironmentVariable(variable) ?? "(unset)";
}
