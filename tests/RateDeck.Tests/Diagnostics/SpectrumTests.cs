using System.Numerics;
using RateDeck.Diagnostics;
using RateDeck.LinearAlgebra;
using RateDeck.Rates;
using Xunit;

namespace RateDeck.Tests.Diagnostics;

public class SpectrumTests
{
    private static readonly ILinearAlgebra _algebra = new ManagedLinearAlgebra();

    /// <summary>
    /// Reflecting random walk on n sites, hop rate r: K = -r L with L the Laplacian of the path graph,
    /// whose eigenvalues are 2 - 2 cos(k pi / n), k = 0..n-1, with cosine (DCT-II) eigenvectors
    /// (Strang, The discrete cosine transform, SIAM Review 41 (1999) 135; Brouwer and Haemers,
    /// Spectra of Graphs, 2012, sec. 1.4.4, from memory). Stationary law uniform.
    /// </summary>
    private static double[] RandomWalkEigenvalues(int n, double r) =>
        [.. Enumerable.Range(0, n).Select(k => -2 * r * (1 - Math.Cos(k * Math.PI / n))).Order()];

    [Fact]
    public void RandomWalk_SymmetricPath_MatchesPathGraphSpectrum()
    {
        const int n = 50;
        const double r = 1.7;
        var spectrum = Spectrum.Compute(TestMatrices.RandomWalk(n, r), _algebra);
        var expected = RandomWalkEigenvalues(n, r);

        Assert.Equal(SpectrumPath.Symmetrized, spectrum.Path);
        Assert.Equal(2 * r * (1 - Math.Cos((n - 1) * Math.PI / n)), spectrum.SpectralRadius, 1e-12);
        for (var k = 0; k < n; k++)
        {
            Assert.Equal(expected[k], spectrum.Eigenvalues[k], 1e-12);
        }

        Assert.Equal(1, spectrum.NullDimension);
        Assert.Equal(2 * r * (1 - Math.Cos(Math.PI / n)), spectrum.SlowestRate!.Value, 1e-12);
        var uniform = spectrum.NullVectorOn([.. Enumerable.Range(0, n)])!;
        Assert.All(uniform, p => Assert.Equal(1.0 / n, p, 1e-13));
    }

    [Fact]
    public void RandomWalk_GeneralPath_MatchesPathGraphSpectrum_WhenTheDeckEquilibriumDisagrees()
    {
        // A deck pi that is not uniform breaks detailed balance against the deck: the general solver must run.
        const int n = 30;
        var tilted = Enumerable.Range(0, n).Select(i => -0.1 * i).ToArray();
        var spectrum = Spectrum.Compute(TestMatrices.RandomWalk(n, 1.0, BalanceOrigin.TakenAsGiven, tilted), _algebra);
        var expected = RandomWalkEigenvalues(n, 1.0);

        Assert.Equal(SpectrumPath.General, spectrum.Path);
        Assert.Contains("general eigen-decomposition", spectrum.PathReason);
        Assert.True(spectrum.IsReal);
        for (var k = 0; k < n; k++)
        {
            Assert.Equal(expected[k], spectrum.Eigenvalues[k], 1e-12);
        }

        Assert.Equal(1, spectrum.NullDimension);
    }

    [Fact]
    public void Ehrenfest_MatchesKacSpectrumAndBinomialLaw()
    {
        // Kac, Random walk and the theory of Brownian motion, Am. Math. Monthly 54 (1947) 369: the
        // Ehrenfest transition matrix P on m balls has eigenvalues 1 - 2k/m, k = 0..m, and the binomial
        // stationary law C(m, n) / 2^m. Our generator is K = r (P - I), so its eigenvalues are -2 r k / m.
        const int m = 40;
        const double r = 3.0;
        var spectrum = Spectrum.Compute(TestMatrices.Ehrenfest(m, r), _algebra);

        Assert.Equal(SpectrumPath.Symmetrized, spectrum.Path);
        var expected = Enumerable.Range(0, m + 1).Select(k => -2 * r * k / m).Order().ToArray();
        for (var k = 0; k <= m; k++)
        {
            Assert.Equal(expected[k], spectrum.Eigenvalues[k], 1e-12);
        }

        Assert.Equal(1, spectrum.NullDimension);
        Assert.Equal(2 * r / m, spectrum.SlowestRate!.Value, 1e-12);
        var law = spectrum.NullVectorOn([.. Enumerable.Range(0, m + 1)])!;
        for (var n = 0; n <= m; n++)
        {
            // Binomial probability by the product formula, independent of the state space's log weights.
            var probability = Enumerable.Range(1, n).Aggregate(1.0, (acc, i) => acc * (m - n + i) / i) / Math.Pow(2, m);
            Assert.Equal(probability, law[n], 1e-13);
        }
    }

    [Fact]
    public void Ehrenfest_GeneralPath_MatchesKacSpectrum()
    {
        // Same chain against a uniform deck pi: detailed balance fails for the deck, the general solver runs.
        const int m = 12;
        var chain = TestMatrices.Ehrenfest(m, 1.0);
        var uniformDeck = TestMatrices.Wrap(chain.Generator, new double[m + 1], BalanceOrigin.TakenAsGiven, chain.Loss, chain.Pumping, chain.States.Labels);
        var spectrum = Spectrum.Compute(uniformDeck, _algebra);

        Assert.Equal(SpectrumPath.General, spectrum.Path);
        var expected = Enumerable.Range(0, m + 1).Select(k => -2.0 * k / m).Order().ToArray();
        for (var k = 0; k <= m; k++)
        {
            Assert.Equal(expected[k], spectrum.Eigenvalues[k], 1e-9);
        }
    }

    [Theory]
    [InlineData("cyclic3")]
    [InlineData("reducible5")]
    [InlineData("balanced4")]
    public void SmallMatrices_MatchSciPyEigenvaluesAndNullVectors(string name)
    {
        // Reference: scipy.linalg.eigvals and scipy.linalg.null_space (Debian SciPy, versions in the fixture).
        var entry = TestMatrices.Case(name);
        var rates = TestMatrices.FromFixture(name);
        var spectrum = Spectrum.Compute(rates, _algebra);
        var real = TestMatrices.Doubles(entry, "eigenvalues_real");
        var imaginary = TestMatrices.Doubles(entry, "eigenvalues_imag");

        Assert.Equal(real.Length, spectrum.Values.Length);
        for (var k = 0; k < real.Length; k++)
        {
            var reference = new Complex(real[k], imaginary[k]);
            var nearest = spectrum.Values.Min(v => Complex.Abs(v - reference));
            Assert.True(nearest <= 1e-12 * spectrum.SpectralRadius, $"eigenvalue {reference} of {name}: nearest computed is {nearest} away");
        }

        Assert.Equal(entry.GetProperty("null_dimension").GetInt32(), spectrum.NullDimension);
        var classes = TransitionGraph.Classify(rates);
        var referenceClasses = entry.GetProperty("closed_classes").EnumerateArray().Select(c => c.EnumerateArray().Select(l => l.GetString()!).ToArray()).ToArray();
        var referenceVectors = entry.GetProperty("class_null_vectors").EnumerateArray().Select(v => v.EnumerateArray().Select(x => x.GetDouble()).ToArray()).ToArray();
        Assert.Equal(referenceClasses.Length, classes.Closed.Count);
        for (var c = 0; c < referenceClasses.Length; c++)
        {
            Assert.Equal(referenceClasses[c], classes.Closed[c].Labels);
            var vector = spectrum.NullVectorOn(classes.Closed[c].States)!;
            for (var k = 0; k < vector.Length; k++)
            {
                Assert.Equal(referenceVectors[c][k], vector[k], 1e-12);
            }
        }
    }

    [Fact]
    public void CyclicMatrix_HasComplexPair_AndTakesTheGeneralPath()
    {
        // Circulant ring with rates 2 one way, 0.5 the other: eigenvalues -(a+b) + a w + b w^2 with
        // w = exp(2 pi i / 3), i.e. -3.75 +- 1.299i (circulant eigenvalues, common practice; also in the SciPy fixture).
        var spectrum = Spectrum.Compute(TestMatrices.FromFixture("cyclic3"), _algebra);
        var w = Complex.FromPolarCoordinates(1, 2 * Math.PI / 3);
        var expected = -2.5 + (2 * w) + (0.5 * w * w);

        Assert.Equal(SpectrumPath.General, spectrum.Path);
        Assert.False(spectrum.IsReal);
        Assert.Equal(Math.Abs(expected.Imaginary), spectrum.MaxImaginaryPart, 1e-12);
        Assert.Equal(Complex.Abs(expected), spectrum.SpectralRadius, 1e-12);
        Assert.Equal(-expected.Real, spectrum.SlowestRate!.Value, 1e-12);
    }

    [Fact]
    public void BalancedMatrixTakenAsGiven_TakesTheSymmetricPath()
    {
        var spectrum = Spectrum.Compute(TestMatrices.FromFixture("balanced4", BalanceOrigin.TakenAsGiven), _algebra);

        Assert.Equal(SpectrumPath.Symmetrized, spectrum.Path);
        Assert.Contains("detailed balance holds for the deck's pi", spectrum.PathReason);
    }
}
