using System.Buffers.Binary;
using RateDeck.Outputs;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Outputs;

public sealed class PlotTests
{
    // The PNG signature and the IHDR layout (width and height as big-endian 32-bit integers at
    // bytes 16..23) are fixed by the PNG specification (W3C, Portable Network Graphics, sections 5.2 and 11.2.2).
    private static readonly byte[] _pngSignature = [0x89, (byte)'P', (byte)'N', (byte)'G', 0x0D, 0x0A, 0x1A, 0x0A];

    private static readonly double[] _times = [0.0, .. Enumerable.Range(0, 40).Select(k => Math.Pow(10, -3 + k / 8.0))];

    [Fact]
    public void PopulationsOverTime_WritesAPngOfTheRequestedSize()
    {
        using var folder = new TempFolder();
        var path = folder.File("populations.png");
        var exact = _times.Select(t => Math.Exp(-t)).ToArray();
        var explicitRun = _times.Select(t => Math.Exp(-1.01 * t)).ToArray();

        Plots.PopulationsOverTime(path, new PlotText("Decay", "time (ps)", "population"), _times,
            [new StateSeries("A", exact, explicitRun), new StateSeries("B", exact.Select(p => 1 - p).ToArray())],
            new PlotOptions { Width = 900, Height = 600 }, "exact", "rk4");

        AssertPng(path, 900, 600);
        Assert.Equal(["populations.png"], folder.Entries());
    }

    [Fact]
    public void PopulationMap_WritesAPngOfTheRequestedSize()
    {
        using var folder = new TempFolder();
        var path = folder.File("map.png");
        double[] coordinates = [1, 2, 4, 8, 16, 32, 64, 128];
        var populations = _times.Select(t => coordinates.Select(x => Math.Exp(-x * t) * (t == 0 && x > 1 ? 0 : 1)).ToArray()).ToArray();

        Plots.PopulationMap(path, new PlotText("Map", "time (ps)", "k (1/nm)"), _times, coordinates, populations,
            new PlotOptions { Width = 1000, Height = 700 });

        AssertPng(path, 1000, 700);
    }

    [Fact]
    public void PopulationMap_WithDescendingStateAxis_IsRejectedAndWritesNothing()
    {
        using var folder = new TempFolder();
        var populations = _times.Select(_ => new[] { 0.5, 0.5 }).ToArray();

        Assert.Throws<ArgumentException>(() =>
            Plots.PopulationMap(folder.File("map.png"), new PlotText("Map", "t (s)", "x (1)"), _times, [2.0, 1.0], populations));
        Assert.Empty(folder.Entries());
    }

    [Fact]
    public void Spectrum_WritesAPngOfTheRequestedSize()
    {
        using var folder = new TempFolder();
        var path = folder.File("spectrum.png");
        System.Numerics.Complex[] eigenvalues = [0.0, -1e-3, -0.1, -2.0, -40.0, -900.0, -3e4, new(-5, 20), new(-5, -20)];

        Plots.Spectrum(path, new PlotText("Spectrum", "mode", "|λ·dt|"), eigenvalues, dt: 0.01, zeroTolerance: 1e-12,
            new PlotOptions { Width = 1200, Height = 800 });

        AssertPng(path, 1200, 800);
    }

    [Fact]
    public void Boltzmann_WritesAPngOfTheRequestedSize()
    {
        using var folder = new TempFolder();
        var path = folder.File("boltzmann.png");
        double[] energies = [0, 1, 2, 3];
        double[] logWeights = [0, Math.Log(3), Math.Log(5), Math.Log(7)];

        Plots.Boltzmann(path, new PlotText("Boltzmann", "E (eV)", "ln(n/g)"),
            new BoltzmannPoints("final", energies, logWeights, [0.7, 0.2, 0.1, 0], [-0.5, -1.2, -2.1, -3.3], 1.0, "eV"),
            new PlotOptions { Width = 800, Height = 600 });

        AssertPng(path, 800, 600);
    }

    [Fact]
    public void Distributions_WritesAPngOfTheRequestedSize()
    {
        using var folder = new TempFolder();
        var path = folder.File("distributions.png");
        var coordinates = Enumerable.Range(0, 30).Select(i => Math.Pow(10, i / 10.0)).ToArray();
        var steady = coordinates.Select(x => x * x * Math.Exp(-x / 20)).ToArray();
        var initial = coordinates.Select((_, i) => i == 0 ? 1.0 : 0.0).ToArray();

        Plots.Distributions(path, new PlotText("Distributions", "k (1/nm)", "population"), coordinates,
            [new Curve("initial", initial), new Curve("steady state", steady)], new PlotOptions { Width = 640, Height = 480 });

        AssertPng(path, 640, 480);
    }

    [Fact]
    public void TooSmallImage_IsRejected()
    {
        using var folder = new TempFolder();

        Assert.Throws<ArgumentException>(() => Plots.Distributions(folder.File("x.png"), new PlotText("t", "x", "y"), [1.0], [new Curve("a", [1.0])],
            new PlotOptions { Width = 50, Height = 50 }));
    }

    [Fact]
    public void FontFamily_IsInstalled_SoThatPlotsCarryText()
    {
        // Without any font the plots are drawn with no text at all. On Debian: apt-get install fonts-dejavu-core.
        Assert.NotNull(Plots.FontFamily);
    }

    private static void AssertPng(string path, int width, int height)
    {
        var bytes = File.ReadAllBytes(path);
        Assert.True(bytes.Length > 33, "A PNG has at least a signature and an IHDR chunk.");
        Assert.Equal(_pngSignature, bytes[..8]);
        Assert.Equal("IHDR", System.Text.Encoding.ASCII.GetString(bytes, 12, 4));
        Assert.Equal(width, BinaryPrimitives.ReadInt32BigEndian(bytes.AsSpan(16, 4)));
        Assert.Equal(height, BinaryPrimitives.ReadInt32BigEndian(bytes.AsSpan(20, 4)));
    }
}
