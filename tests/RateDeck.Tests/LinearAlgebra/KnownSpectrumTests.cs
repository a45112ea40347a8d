using System.Numerics;
using System.Text.Json;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.LinearAlgebra;
using Xunit;
using static RateDeck.Tests.LinearAlgebra.LinearAlgebraChecks;

namespace RateDeck.Tests.LinearAlgebra;

/// <summary>
/// Each provider against spectra known from outside the project: closed forms and SciPy's values
/// (tests/reference/make_linalg_fixtures.py). Every check runs for the managed provider and,
/// where the library loads, for the native one.
/// </summary>
public class KnownSpectrumTests
{
    private static readonly ManagedLinearAlgebra _managed = new();

    public static TheoryData<int> TridiagonalOrders => [1, 2, 7, 50, 200];

    public static TheoryData<string> SymmetricFixtures => ["hilbert4", "hilbert6"];

    [Theory, MemberData(nameof(TridiagonalOrders))]
    public void SecondDifferenceMatrix_MatchesClosedForm_Managed(int n) => CheckSecondDifference(_managed, n);

    [NativeTheory, MemberData(nameof(TridiagonalOrders))]
    public void SecondDifferenceMatrix_MatchesClosedForm_Native(int n) => CheckSecondDifference(NativeLapack.Required, n);

    [NativeTheory, MemberData(nameof(TridiagonalOrders))]
    public void SecondDifferenceMatrix_MatchesClosedForm_NativeRelativelyRobustDriver(int n) =>
        CheckSecondDifference(NativeLapack.Required.WithSymmetricDriver(SymmetricEigenDriver.RelativelyRobust), n);

    [Theory, MemberData(nameof(SymmetricFixtures))]
    public void HilbertMatrix_MatchesSciPy_Managed(string name) => CheckSymmetricFixture(_managed, name);

    [NativeTheory, MemberData(nameof(SymmetricFixtures))]
    public void HilbertMatrix_MatchesSciPy_Native(string name) => CheckSymmetricFixture(NativeLapack.Required, name);

    [Fact]
    public void GrcarMatrix_MatchesSciPy_Managed() => CheckGrcar(_managed);

    [NativeFact]
    public void GrcarMatrix_MatchesSciPy_Native() => CheckGrcar(NativeLapack.Required);

    [Fact]
    public void RepeatedEigenvalues_GiveOrthonormalBasis_Managed() => CheckRepeatedEigenvalues(_managed);

    [NativeFact]
    public void RepeatedEigenvalues_GiveOrthonormalBasis_Native() => CheckRepeatedEigenvalues(NativeLapack.Required);

    [Fact]
    public void OneByOne_IsItsOwnEigenvalue_Managed() => CheckOneByOne(_managed);

    [NativeFact]
    public void OneByOne_IsItsOwnEigenvalue_Native() => CheckOneByOne(NativeLapack.Required);

    [Fact]
    public void SingularSolve_Throws_Managed() => CheckSingularSolves(_managed);

    [NativeFact]
    public void SingularSolve_Throws_Native() => CheckSingularSolves(NativeLapack.Required);

    [Fact]
    public void DefectiveMatrix_KeepsRepeatedEigenvalue_Managed() => CheckDefective(_managed);

    [NativeFact]
    public void DefectiveMatrix_KeepsRepeatedEigenvalue_Native() => CheckDefective(NativeLapack.Required);

    [Fact]
    public void SelfCheck_KnownAnswersHoldForManaged() => Assert.Null(NativeSelfCheck.Run(_managed));

    /// <summary>
    /// [-1 2 -1] of order n: eigenvalues 2 - 2 cos(k pi / (n + 1)) and eigenvectors
    /// sqrt(2 / (n + 1)) sin(j k pi / (n + 1)), the standard closed form of the second-difference matrix
    /// (common practice; given in G. Strang's applied-mathematics texts, cited from memory). Values to
    /// 1e-12 of the spectral radius; vectors up to sign.
    /// </summary>
    private static void CheckSecondDifference(ILinearAlgebra provider, int n)
    {
        var a = SecondDifference(n);
        var decomposition = provider.SymmetricEigen(a);
        var expected = Enumerable.Range(1, n).Select(k => 2 - 2 * Math.Cos(k * Math.PI / (n + 1))).ToArray();
        AssertClose(expected, decomposition.Values, 1e-12 * SpectralRadius(expected), "eigenvalues");
        var exactVectors = DenseMatrix.Create(n, n, (j, k) => Math.Sqrt(2.0 / (n + 1)) * Math.Sin((j + 1) * (k + 1) * Math.PI / (n + 1)));
        AssertSameVectorsUpToSign(exactVectors, decomposition.Vectors);
        AssertSymmetricDecomposition(a, decomposition);
    }

    /// <summary>Hilbert matrices: eigenvalues from SciPy's eigvalsh, to 1e-12 of the spectral radius.</summary>
    private static void CheckSymmetricFixture(ILinearAlgebra provider, string name)
    {
        var fixture = Fixture().GetProperty("symmetric").GetProperty(name);
        var a = ReadMatrix(fixture.GetProperty("matrix"));
        var expected = ReadVector(fixture.GetProperty("eigenvalues"));
        var decomposition = provider.SymmetricEigen(a);
        AssertClose(expected, decomposition.Values, 1e-12 * SpectralRadius(expected), $"{name} eigenvalues");
        AssertSymmetricDecomposition(a, decomposition);
    }

    /// <summary>
    /// A non-normal Grcar-type matrix with complex pairs: eigenvalues from SciPy's eigvals, sorted as
    /// the providers sort. Tolerance 1e-12 of the spectral radius (its eigenvalues are only mildly
    /// sensitive at order 6).
    /// </summary>
    private static void CheckGrcar(ILinearAlgebra provider)
    {
        var fixture = Fixture().GetProperty("general").GetProperty("grcar6");
        var a = ReadMatrix(fixture.GetProperty("matrix"));
        var expected = ReadVector(fixture.GetProperty("eigenvalues_real"))
            .Zip(ReadVector(fixture.GetProperty("eigenvalues_imag")), (re, im) => new Complex(re, im))
            .ToArray();
        var decomposition = provider.GeneralEigen(a);
        AssertSameValues(expected, decomposition.Values, 1e-12 * expected.Max(Complex.Abs));
        AssertGeneralDecomposition(a, decomposition);
    }

    /// <summary>
    /// The all-ones matrix of order 5 has eigenvalue 5 once and 0 four times (rank one, trace 5:
    /// elementary linear algebra). A repeated eigenvalue fixes only its eigenspace, so the check is
    /// the values, an orthonormal V and A V = V L.
    /// </summary>
    private static void CheckRepeatedEigenvalues(ILinearAlgebra provider)
    {
        var ones = DenseMatrix.Create(5, 5, 1.0);
        var decomposition = provider.SymmetricEigen(ones);
        AssertClose([0, 0, 0, 0, 5], decomposition.Values, 1e-12 * 5, "all-ones eigenvalues");
        AssertSymmetricDecomposition(ones, decomposition);

        var identity = DenseMatrix.CreateIdentity(4);
        var identityDecomposition = provider.SymmetricEigen(identity);
        AssertClose([1, 1, 1, 1], identityDecomposition.Values, 1e-15, "identity eigenvalues");
        AssertSymmetricDecomposition(identity, identityDecomposition);
    }

    /// <summary>A 1 x 1 matrix [a]: eigenvalue a, eigenvector of modulus one; [a] x = b gives x = b / a.</summary>
    private static void CheckOneByOne(ILinearAlgebra provider)
    {
        var symmetric = provider.SymmetricEigen(DenseMatrix.OfArray(new[,] { { -3.5 } }));
        Assert.Equal([-3.5], symmetric.Values);
        Assert.Equal(1.0, Math.Abs(symmetric.Vectors[0, 0]));

        var general = provider.GeneralEigen(DenseMatrix.OfArray(new[,] { { 4.25 } }));
        Assert.Equal([new Complex(4.25, 0)], general.Values);
        Assert.Equal(1.0, general.Vectors[0, 0].Magnitude, 1e-15);

        var solution = provider.Solve(DenseMatrix.OfArray(new[,] { { 2.0 } }), DenseMatrix.OfArray(new[,] { { 3.0 } }));
        Assert.Equal(1.5, solution[0, 0]);
        Assert.Throws<SingularMatrixException>(() => provider.Solve(DenseMatrix.OfArray(new[,] { { 0.0 } }), DenseMatrix.OfArray(new[,] { { 1.0 } })));
    }

    /// <summary>
    /// [1 2; 2 4] has rank one (an exactly zero pivot); [1 2 3; 4 5 6; 7 8 9] has rank two, its last
    /// pivot is rounding noise (elementary linear algebra). Both providers refuse both.
    /// </summary>
    private static void CheckSingularSolves(ILinearAlgebra provider)
    {
        var rankOne = DenseMatrix.OfArray(new double[,] { { 1, 2 }, { 2, 4 } });
        Assert.Throws<SingularMatrixException>(() => provider.Solve(rankOne, DenseMatrix.Create(2, 1, 1.0)));
        var rankTwo = DenseMatrix.OfArray(new double[,] { { 1, 2, 3 }, { 4, 5, 6 }, { 7, 8, 9 } });
        Assert.Throws<SingularMatrixException>(() => provider.Solve(rankTwo, DenseMatrix.Create(3, 2, 1.0)));
    }

    /// <summary>An upper-triangular Jordan-type block [2 1; 0 2] has the double eigenvalue 2 (its diagonal).</summary>
    private static void CheckDefective(ILinearAlgebra provider)
    {
        var values = provider.GeneralEigen(DenseMatrix.OfArray(new double[,] { { 2, 1 }, { 0, 2 } })).Values;
        AssertSameValues([2, 2], values, 1e-15);
    }

    private static JsonElement Fixture()
    {
        var path = Path.Combine(AppContext.BaseDirectory, "fixtures", "linalg.json");
        using var document = JsonDocument.Parse(File.ReadAllText(path));
        return document.RootElement.Clone();
    }

    private static double[] ReadVector(JsonElement array) => array.EnumerateArray().Select(x => x.GetDouble()).ToArray();

    private static DenseMatrix ReadMatrix(JsonElement rows) =>
        DenseMatrix.OfRowArrays(rows.EnumerateArray().Select(ReadVector).ToArray());
}
