using System.Numerics;
using System.Text.Json;
using CsvHelper;
using RateDeck.Outputs;
using RateDeck.Propagation;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Outputs;

public sealed class CsvOutputTests
{
    private static readonly OutputHeader _header = new("1.2.3+abc", "decks/cascade.toml", new string('a', 64), ["kT=2.5", "run.dt=0.001"]);

    // Doubles whose text form is easy to get wrong: non-terminating binary fractions, the extremes,
    // subnormals and zero. Exact round trip of "R" formatting is the documented .NET
    // (Core 3.0 and later) behaviour for double.ToString("R") and double.Parse.
    private static readonly double[] _awkward =
    [
        0.1, 1.0 / 3.0, 0.1 + 0.2, Math.PI * 1e100, -Math.E * 1e-100, double.MaxValue, double.MinValue,
        double.Epsilon, 2.2250738585072014e-308, 2.2250738585072009e-308, 0.0, 1e23, 9007199254740993.0,
    ];

    [Fact]
    public void Trajectory_StartsWithProvenanceComments_ThenHeaderRow()
    {
        using var folder = new TempFolder();
        var path = folder.File("trajectory.csv");

        ResultCsv.WriteTrajectory(path, _header, ["k1", "k2"], new Trajectory([0.0, 1.0], [[1.0, 0.0], [0.5, 0.5]]), "ps");

        var lines = File.ReadAllLines(path);
        Assert.Equal("# ratedeck 1.2.3+abc", lines[0]);
        Assert.Equal("# deck: decks/cascade.toml", lines[1]);
        Assert.Equal("# deck_sha256: " + new string('a', 64), lines[2]);
        Assert.Equal("# overrides: [\"kT=2.5\",\"run.dt=0.001\"]", lines[3]);
        Assert.Equal("# time_unit: ps", lines[4]);
        Assert.Equal("time,k1,k2", lines.First(l => !l.StartsWith('#')));
    }

    [Fact]
    public void Header_WithoutOverrides_SaysNone()
    {
        var header = new OutputHeader("0.1.0", "d.toml", "00", []);

        Assert.Equal("# overrides: none", header.Lines().Last());
    }

    [Fact]
    public void Header_OverridesWithCommasQuotesAndLineBreaks_StayOneUnambiguousLine()
    {
        string[] overrides = ["kernel=\"exp(-x, y)\"", "title=a\nb"];
        var header = new OutputHeader("0.1.0", "d.toml", "00", overrides);

        var line = header.Lines().Last();

        Assert.DoesNotContain('\n', line);
        Assert.Equal(overrides, JsonSerializer.Deserialize<string[]>(line["# overrides: ".Length..]));
    }

    [Fact]
    public void Trajectory_RoundTripsEveryNonZeroDoubleBitForBit()
    {
        var random = new Random(20240611);
        var randomBits = Enumerable.Range(0, 400).Select(_ => RandomFiniteDouble(random)).ToArray();
        var values = _awkward.Concat(randomBits).ToArray();
        var times = values.Select((_, k) => k * 0.1).ToArray();
        var populations = values.Select(v => new[] { v, v == 0 ? 0.0 : -v, v / 7.0 }).ToArray();
        using var folder = new TempFolder();
        var path = folder.File("trajectory.csv");

        ResultCsv.WriteTrajectory(path, _header, ["a", "b", "c"], new Trajectory(times, populations), "s");
        var table = ReadTable(path);

        Assert.Equal(["time", "a", "b", "c"], table.Header);
        Assert.Equal(values.Length, table.Rows.Count);
        for (var k = 0; k < values.Length; k++)
        {
            AssertSameBits(times[k], table.Number(k, "time"));
            AssertSameBits(populations[k][0], table.Number(k, "a"));
            AssertSameBits(populations[k][1], table.Number(k, "b"));
            AssertSameBits(populations[k][2], table.Number(k, "c"));
        }
    }

    [Fact]
    public void NonFiniteValues_AreWrittenAsInfAndNan_AndReadBack()
    {
        Assert.Equal("inf", CsvNumber.Format(double.PositiveInfinity));
        Assert.Equal("-inf", CsvNumber.Format(double.NegativeInfinity));
        Assert.Equal("nan", CsvNumber.Format(double.NaN));
        Assert.True(CsvNumber.TryParse("inf", out var inf) && double.IsPositiveInfinity(inf));
        Assert.True(CsvNumber.TryParse("-inf", out var minusInf) && double.IsNegativeInfinity(minusInf));
        Assert.True(CsvNumber.TryParse("NaN", out var nan) && double.IsNaN(nan));
        Assert.False(CsvNumber.TryParse("1,5", out _));
    }

    [Fact]
    public void Differences_AreAbsoluteExplicitMinusExact()
    {
        var exact = new Trajectory([0.0, 2.0], [[1.0, 0.0], [0.25, 0.75]]);
        var explicitRun = new Trajectory([0.0, 2.0], [[1.0, 0.0], [0.5, 0.5]]);
        using var folder = new TempFolder();
        var path = folder.File("differences.csv");

        ResultCsv.WriteDifferences(path, _header, ["low", "high"], exact, explicitRun, "s");
        var table = ReadTable(path);

        Assert.Equal(["time", "low", "high"], table.Header);
        Assert.Equal(0.25, table.Number(1, "low"));
        Assert.Equal(0.25, table.Number(1, "high"));
        Assert.Equal(0.0, table.Number(0, "low"));
    }

    [Fact]
    public void Differences_WithMismatchedTimes_AreRejected()
    {
        var exact = new Trajectory([0.0, 1.0], [[1.0], [0.5]]);
        var explicitRun = new Trajectory([0.0, 1.5], [[1.0], [0.5]]);
        using var folder = new TempFolder();

        Assert.Throws<ArgumentException>(() => ResultCsv.WriteDifferences(folder.File("d.csv"), _header, ["a"], exact, explicitRun, "s"));
        Assert.Empty(folder.Entries());
    }

    [Fact]
    public void Spectrum_RelaxationTimeIsInverseMagnitude_AndInfiniteForZeroModes()
    {
        using var folder = new TempFolder();
        var path = folder.File("spectrum.csv");

        ResultCsv.WriteSpectrum(path, _header, [-4.0, -1e-18, 0.0, -0.5], "ns", zeroTolerance: 1e-15);
        var table = ReadTable(path);

        Assert.Equal(["mode", "eigenvalue", "relaxation_time"], table.Header);
        Assert.Equal(0.25, table.Number(0, "relaxation_time"));
        Assert.Equal("inf", table.Rows[1][2]);
        Assert.Equal("inf", table.Rows[2][2]);
        Assert.Equal(2.0, table.Number(3, "relaxation_time"));
        Assert.Contains("# eigenvalue_unit: 1/ns", File.ReadAllLines(path));
    }

    [Fact]
    public void Spectrum_NumbersModesFromOneAndNeverWritesNegativeZero()
    {
        using var folder = new TempFolder();
        var path = folder.File("spectrum.csv");

        // A zero eigenvalue often comes out of an eigen-solver as -0 (IEEE 754 signed zero), and a
        // real mode's imaginary part as -0 too; a reader counts modes from 1 (common practice).
        ResultCsv.WriteSpectrum(path, _header, [new Complex(-2.0, -0.0), new Complex(-0.0, 0.0), new Complex(-1.0, 0.5)], "s");
        var table = ReadTable(path);

        Assert.Equal(["1", "2", "3"], table.Column("mode"));
        Assert.DoesNotContain(table.Rows, row => row.Contains("-0"));
        Assert.Equal("0", table.Rows[1][1]);
        Assert.Equal("0", table.Rows[0][2]);
    }

    [Fact]
    public void ComplexSpectrum_UsesTheRealPartForTheRelaxationTime()
    {
        using var folder = new TempFolder();
        var path = folder.File("spectrum.csv");

        ResultCsv.WriteSpectrum(path, _header, [new Complex(-2.0, 3.0), new Complex(0.0, 0.0)], "s");
        var table = ReadTable(path);

        Assert.Equal(["mode", "eigenvalue_re", "eigenvalue_im", "relaxation_time"], table.Header);
        Assert.Equal(3.0, table.Number(0, "eigenvalue_im"));
        Assert.Equal(0.5, table.Number(0, "relaxation_time"));
        Assert.Equal("inf", table.Rows[1][3]);
    }

    [Fact]
    public void SteadyState_KeepsTheLogarithmWhereTheEquilibriumUnderflows()
    {
        using var folder = new TempFolder();
        var path = folder.File("steady.csv");

        ResultCsv.WriteSteadyState(path, _header, ["g0", "g1"], [0.5, 1.5], [1.0, 0.0], [0.0, -800.0]);
        var table = ReadTable(path);

        Assert.Equal(["label", "coordinate", "population", "equilibrium", "ln_equilibrium"], table.Header);
        Assert.Equal(1.0, table.Number(0, "equilibrium"));
        Assert.Equal(0.0, table.Number(1, "equilibrium"));
        Assert.Equal(-800.0, table.Number(1, "ln_equilibrium"));
    }

    [Fact]
    public void PerStateTable_WritesUnitsLine_AndQuotesLabelsThatLookLikeComments()
    {
        using var folder = new TempFolder();
        var path = folder.File("mechanics.csv");

        ResultCsv.WritePerStateTable(path, _header, ["#1", "a,b"],
            [new CsvColumn("energy", [1.0, 2.0], "meV"), new CsvColumn("action", [3.0, 4.0], "meV ps"), new CsvColumn("weight", [5.0, 6.0])]);
        var table = ReadTable(path);

        Assert.Contains("# units: energy=meV, action=meV ps", File.ReadAllLines(path));
        Assert.Equal(["label", "energy", "action", "weight"], table.Header);
        Assert.Equal(["#1", "a,b"], table.Column("label"));
        Assert.Equal(6.0, table.Number(1, "weight"));
    }

    [Fact]
    public void PerStateTable_WithAColumnOfTheWrongLength_IsRejected()
    {
        using var folder = new TempFolder();

        Assert.Throws<ArgumentException>(() =>
            ResultCsv.WritePerStateTable(folder.File("x.csv"), _header, ["a", "b"], [new CsvColumn("energy", [1.0])]));
    }

    [Fact]
    public void NumericColumns_WriteOneColumnPerEntry_AndRejectRaggedColumns()
    {
        using var folder = new TempFolder();
        var path = folder.File("residuals.csv");

        ResultCsv.WriteColumns(path, _header, [new CsvColumn("time", [0.0, 1.0], "s"), new CsvColumn("residual", [0.125, -0.5])]);
        var table = ReadTable(path);

        Assert.Equal(["time", "residual"], table.Header);
        Assert.Equal(-0.5, table.Number(1, "residual"));
        Assert.Contains("# units: time=s", File.ReadAllLines(path));
        Assert.Throws<ArgumentException>(() =>
            ResultCsv.WriteColumns(folder.File("bad.csv"), _header, [new CsvColumn("time", [0.0, 1.0]), new CsvColumn("residual", [0.1])]));
    }

    private static double RandomFiniteDouble(Random random)
    {
        while (true)
        {
            var value = BitConverter.Int64BitsToDouble(random.NextInt64(long.MinValue, long.MaxValue));
            if (double.IsFinite(value))
            {
                return value;
            }
        }
    }

    private static void AssertSameBits(double expected, double actual) =>
        Assert.Equal(BitConverter.DoubleToInt64Bits(expected), BitConverter.DoubleToInt64Bits(actual));

    private static CsvTable ReadTable(string path)
    {
        using var reader = CsvReader.FromFile(path, ResultCsv.ReaderOptions);
        var rows = new List<string[]>();
        while (reader.Read())
        {
            rows.Add(reader.Current.ToArray());
        }
        return new CsvTable(reader.Headers!.ToArray(), rows);
    }

    private sealed record CsvTable(string[] Header, List<string[]> Rows)
    {
        public string[] Column(string name) => Rows.Select(r => r[Array.IndexOf(Header, name)]).ToArray();

        public double Number(int row, string name)
        {
            Assert.True(CsvNumber.TryParse(Rows[row][Array.IndexOf(Header, name)], out var value));
            return value;
        }
    }
}
