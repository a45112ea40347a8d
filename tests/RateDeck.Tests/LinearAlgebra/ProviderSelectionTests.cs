using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using Xunit;

namespace RateDeck.Tests.LinearAlgebra;

/// <summary>How the provider is chosen, and that a missing or lying library falls back with a reason.</summary>
public class ProviderSelectionTests
{
    private static readonly Func<(OpenBlasLinearAlgebra?, string)> _absent = () => (null, "native library libabsent.so.0 not found");

    [Fact]
    public void MissingLibrary_IsReportedByName()
    {
        var load = LapackImports.Load([new LibraryCandidate("libratedeck-absent.so.0", null), new LibraryCandidate("libratedeck-absent-lapack.so.3", "libblas.so.3")]);
        Assert.Null(load.Imports);
        Assert.Equal("native library libratedeck-absent.so.0 not found; native library libratedeck-absent-lapack.so.3 not found", load.Reason);
        Assert.Null(OpenBlasLinearAlgebra.Create(load).Provider);
    }

    [Fact]
    public void Auto_WithoutNativeLibrary_FallsBackToManagedWithReason()
    {
        var provider = LinearAlgebraProviders.Select(null, null, _absent, out var reason);
        Assert.IsType<ManagedLinearAlgebra>(provider);
        Assert.Equal("managed: auto (the default), native not usable: native library libabsent.so.0 not found", reason);
    }

    [Fact]
    public void ForcedNative_WithoutNativeLibrary_IsAPlainError()
    {
        var error = Assert.Throws<LinearAlgebraChoiceException>(() => LinearAlgebraProviders.Select(null, "native", _absent, out _));
        Assert.Contains("RATEDECK_LINALG=native", error.Message);
        Assert.Contains("libabsent.so.0 not found", error.Message);
    }

    [Fact]
    public void ExplicitChoice_OverridesEnvironment()
    {
        var provider = LinearAlgebraProviders.Select("Managed", "native", () => throw new InvalidOperationException("must not load"), out var reason);
        Assert.IsType<ManagedLinearAlgebra>(provider);
        Assert.Equal("managed: asked for explicitly", reason);
    }

    [Fact]
    public void EnvironmentChoice_IsNamedInTheReason()
    {
        LinearAlgebraProviders.Select(" ", "managed", _absent, out var reason);
        Assert.Equal("managed: asked for by RATEDECK_LINALG=managed", reason);
    }

    [Fact]
    public void UnknownChoice_ListsTheValidOnes()
    {
        var error = Assert.Throws<LinearAlgebraChoiceException>(() => LinearAlgebraProviders.Select("fast", null, _absent, out _));
        Assert.Equal("unknown linear-algebra choice 'fast' (asked for explicitly): use auto, native or managed", error.Message);
    }

    [Fact]
    public void SelfCheck_CatchesAProviderWithWrongProducts()
    {
        Assert.Equal("dgemm_ gave a wrong 2 x 2 product", NativeSelfCheck.Run(new TransposingProvider()));
    }

    [NativeFact]
    public void NativeChoice_GivesTheNativeProviderNamedByItsLibrary()
    {
        var provider = LinearAlgebraProviders.Select("native", out var reason);
        Assert.StartsWith("native (", provider.Name);
        Assert.Contains("passed the self-check", reason);
    }

    [NativeFact]
    public void Auto_WithNativeLibrary_ChoosesNative()
    {
        var provider = LinearAlgebraProviders.Select("auto", out var reason);
        Assert.IsType<OpenBlasLinearAlgebra>(provider);
        Assert.StartsWith("native: auto", reason);
    }

    /// <summary>Managed answers, except products that come out transposed, as from a swapped argument order.</summary>
    private sealed class TransposingProvider : ILinearAlgebra
    {
        private readonly ManagedLinearAlgebra _inner = new();

        public string Name => "transposing";

        public SymmetricEigenDecomposition SymmetricEigen(DenseMatrix symmetric) => _inner.SymmetricEigen(symmetric);

        public SymmetricEigenDecomposition SymmetricEigenOverwriting(DenseMatrix symmetric) => _inner.SymmetricEigenOverwriting(symmetric);

        public double[] SymmetricBandEigenvalues(SymmetricBand band, out string method) => _inner.SymmetricBandEigenvalues(band, out method);

        public GeneralEigenDecomposition GeneralEigen(DenseMatrix matrix) => _inner.GeneralEigen(matrix);

        public DenseMatrix Multiply(DenseMatrix a, DenseMatrix b, bool transposeA = false, bool transposeB = false) =>
            (DenseMatrix)_inner.Multiply(a, b, transposeA, transposeB).Transpose();

        public double[] Multiply(DenseMatrix a, double[] x, bool transposeA = false) => _inner.Multiply(a, x, transposeA);

        public DenseMatrix Solve(DenseMatrix a, DenseMatrix b) => _inner.Solve(a, b);
    }
}
