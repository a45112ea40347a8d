using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using Xunit;
using static RateDeck.Tests.LinearAlgebra.LinearAlgebraChecks;

namespace RateDeck.Tests.LinearAlgebra;

/// <summary>
/// The native provider gives the managed provider's answers on random matrices: the fallback must
/// not change results. Tolerances are stated per check; "rounding" means a few units of
/// k eps max|A| max|B| for an inner dimension k (standard error bound of a dot product, common practice).
/// </summary>
public class ProviderAgreementTests
{
    private static readonly ManagedLinearAlgebra _managed = new();

    public static TheoryData<int> Sizes => [1, 2, 7, 50, 200];

    /// <summary>Eigenvalues to 1e-12 of the spectral radius; eigenvectors up to sign; both decompositions valid.</summary>
    [NativeTheory, MemberData(nameof(Sizes))]
    public void SymmetricEigen_NativeMatchesManaged(int n)
    {
        var a = RandomSymmetric(n, seed: 100 + n);
        var managed = _managed.SymmetricEigen(a);
        var native = NativeLapack.Required.SymmetricEigen(a);
        AssertClose(managed.Values, native.Values, 1e-12 * SpectralRadius(managed.Values), "eigenvalues");
        AssertSameVectorsUpToSign(managed.Vectors, native.Vectors);
        AssertSymmetricDecomposition(a, native);
    }

    [NativeTheory, MemberData(nameof(Sizes))]
    public void SymmetricEigen_RelativelyRobustDriverMatchesDivideAndConquer(int n)
    {
        var a = RandomSymmetric(n, seed: 200 + n);
        var divideAndConquer = NativeLapack.Required.SymmetricEigen(a);
        var relativelyRobust = NativeLapack.Required.WithSymmetricDriver(SymmetricEigenDriver.RelativelyRobust).SymmetricEigen(a);
        AssertClose(divideAndConquer.Values, relativelyRobust.Values, 1e-12 * SpectralRadius(divideAndConquer.Values), "eigenvalues");
        AssertSameVectorsUpToSign(divideAndConquer.Vectors, relativelyRobust.Vectors);
        AssertSymmetricDecomposition(a, relativelyRobust);
    }

    /// <summary>
    /// Same order, eigenvalues to 1e-12 of the spectral radius, eigenvectors up to a complex phase
    /// (1e-8: the error of a non-symmetric eigenvector grows with its condition number).
    /// </summary>
    [NativeTheory, MemberData(nameof(Sizes))]
    public void GeneralEigen_NativeMatchesManaged(int n)
    {
        var a = Random(n, n, seed: 300 + n);
        var managed = _managed.GeneralEigen(a);
        var native = NativeLapack.Required.GeneralEigen(a);
        AssertSameValues(managed.Values, native.Values, 1e-12 * managed.Values.Max(System.Numerics.Complex.Abs));
        AssertSameVectorsUpToPhase(managed, native, 1e-8);
        AssertGeneralDecomposition(a, native);
        AssertGeneralDecomposition(a, managed);
    }

    [NativeTheory, MemberData(nameof(Sizes))]
    public void MatrixProduct_NativeMatchesManaged_ForEveryTransposition(int n)
    {
        // op(A) is n x (n + 2), op(B) is (n + 2) x (n + 1): rectangular, so a wrong leading dimension shows.
        var k = n + 2;
        foreach (var (transposeA, transposeB) in new[] { (false, false), (true, false), (false, true), (true, true) })
        {
            var a = transposeA ? Random(k, n, seed: n) : Random(n, k, seed: n);
            var b = transposeB ? Random(n + 1, k, seed: 2 * n) : Random(k, n + 1, seed: 2 * n);
            var managed = _managed.Multiply(a, b, transposeA, transposeB);
            var native = NativeLapack.Required.Multiply(a, b, transposeA, transposeB);
            AssertClose(managed, native, 4 * k * MachineEpsilon, $"product, transposes {transposeA}/{transposeB}");
        }
    }

    [NativeTheory, MemberData(nameof(Sizes))]
    public void VectorProduct_NativeMatchesManaged_WithAndWithoutTranspose(int n)
    {
        var a = Random(n, n + 3, seed: 400 + n);
        var x = Random(n + 3, 1, seed: 500 + n).Values;
        var xt = Random(n, 1, seed: 600 + n).Values;
        AssertClose(_managed.Multiply(a, x), NativeLapack.Required.Multiply(a, x), 4 * (n + 3) * MachineEpsilon, "A x");
        AssertClose(_managed.Multiply(a, xt, transposeA: true), NativeLapack.Required.Multiply(a, xt, transposeA: true), 4 * n * MachineEpsilon, "A^T x");
    }

    /// <summary>Solutions agree to 1e-9 relative (random matrices of these orders have condition numbers below ~1e4), and both solve.</summary>
    [NativeTheory, MemberData(nameof(Sizes))]
    public void Solve_NativeMatchesManaged(int n)
    {
        var a = Random(n, n, seed: 700 + n);
        var b = Random(n, 3, seed: 800 + n);
        var managed = _managed.Solve(a, b);
        var native = NativeLapack.Required.Solve(a, b);
        AssertClose(managed, native, 1e-9 * managed.Values.Max(Math.Abs), "X");
        AssertClose(b, (DenseMatrix)(a * native), n * 1e-13 * managed.Values.Max(Math.Abs), "A X - B");
    }

    [NativeFact]
    public void NativeOperations_LeaveTheirInputsUnchanged()
    {
        var native = NativeLapack.Required;
        var symmetric = RandomSymmetric(6, seed: 1);
        var general = Random(6, 6, seed: 2);
        var right = Random(6, 2, seed: 3);
        var x = Random(6, 1, seed: 4).Values;
        var copies = new[] { symmetric, general, right }.Select(m => m.Clone()).ToArray();
        var xCopy = (double[])x.Clone();

        native.SymmetricEigen(symmetric);
        native.WithSymmetricDriver(SymmetricEigenDriver.RelativelyRobust).SymmetricEigen(symmetric);
        native.GeneralEigen(general);
        native.Multiply(general, right, transposeA: true);
        native.Multiply(general, x);
        native.Solve(general, right);

        Assert.Equal(copies[0], symmetric);
        Assert.Equal(copies[1], general);
        Assert.Equal(copies[2], right);
        Assert.Equal(xCopy, x);
    }

    /// <summary>
    /// Sweeps may call the provider from several threads at once; the OpenBLAS build must then give the
    /// answers of sequential calls, to 1e-12 of the spectral radius (not bit for bit: the library may split
    /// the work among its threads differently when called from several threads).
    /// </summary>
    [NativeFact]
    public void ConcurrentCalls_GiveTheSequentialAnswers()
    {
        var matrices = Enumerable.Range(0, 4).Select(seed => RandomSymmetric(150, seed)).ToArray();
        var sequential = matrices.Select(m => NativeLapack.Required.SymmetricEigen(m).Values).ToArray();
        var concurrent = matrices.AsParallel().AsOrdered().WithDegreeOfParallelism(4)
            .Select(m => NativeLapack.Required.SymmetricEigen(m).Values).ToArray();
        for (var i = 0; i < matrices.Length; i++)
        {
            AssertClose(sequential[i], concurrent[i], 1e-12 * SpectralRadius(sequential[i]), $"matrix {i} eigenvalues");
        }
    }
}
