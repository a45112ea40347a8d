using RateDeck.Cli;
using RateDeck.Decks;
using RateDeck.Tests.Cli;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary>
/// Issue 8 section 5: time units that convert. The factors are the SI prefixes femto to milli and
/// the minute and hour accepted for use with the SI (SI Brochure, 9th ed. 2019, tables 7 and 8).
/// </summary>
public sealed class TimeUnitsTests
{
    /// <summary>One of each unit in seconds, as the SI Brochure writes them.</summary>
    public static TheoryData<string, double> SecondsPerUnit => new()
    {
        { "fs", 1e-15 },
        { "ps", 1e-12 },
        { "ns", 1e-9 },
        { "us", 1e-6 },
        { "ms", 1e-3 },
        { "s", 1 },
        { "min", 60 },
        { "h", 3600 },
    };

    [Theory]
    [MemberData(nameof(SecondsPerUnit))]
    public void ConvertTime_OneOfEachUnitIsItsSiValueInSeconds(string unit, double seconds)
    {
        Assert.Equal(seconds, TimeUnits.ConvertTime(1, unit, "s"));
        Assert.Equal(1, TimeUnits.ConvertTime(seconds, "s", unit));
    }

    [Theory]
    // Decimal times a deck would write, shifted by SI prefixes: the result is the decimal's shift
    // exactly (the nearest double to it), with no trace of the binary form of the input.
    [InlineData(1e-4, "s", "us", 100)]
    [InlineData(0.3, "s", "ms", 300)]
    [InlineData(2.5e-3, "ms", "ns", 2500)]
    [InlineData(7, "fs", "ps", 7e-3)]
    [InlineData(1.37e-8, "s", "ns", 13.7)]
    [InlineData(123.456, "us", "s", 1.23456e-4)]
    [InlineData(1, "h", "fs", 3.6e18)]
    [InlineData(1.5, "h", "min", 90)]
    [InlineData(90, "min", "h", 1.5)]
    [InlineData(7200, "s", "h", 2)]
    [InlineData(0.25, "min", "ms", 15000)]
    public void ConvertTime_MatchesTheExactDecimalConversion(double value, string from, string to, double expected)
    {
        Assert.Equal(expected, TimeUnits.ConvertTime(value, from, to));
    }

    [Fact]
    public void RateFactor_ConvertsARateByTheRatioOfTheUnits()
    {
        // A rate per `from` is per `to` after multiplying by the seconds in `to` over the seconds in `from`.
        (double Rate, string From, string To, double Expected)[] cases =
        [
            (3e5, "s", "us", 0.3),
            (2e3, "s", "ms", 2),
            (0.5, "ns", "s", 5e8),
            (120, "h", "min", 2),
            (6, "min", "s", 0.1),
            (1, "fs", "h", 3.6e18),
        ];
        Assert.All(cases, c => Assert.Equal(c.Expected, TimeUnits.RateFactor(c.From, c.To).Apply(c.Rate)));
    }

    private const string _known = "Known units: \"fs\", \"ps\", \"ns\", \"us\", \"ms\", \"s\", \"min\", \"h\"";

    [Theory]
    [InlineData("time = \"§sec\"", "unknown time unit \"sec\" in `units.time`. " + _known + "; for a model unit without conversion write model_time = \"sec\" instead.")]
    [InlineData("time = \"s\"\noutput_time = \"§uS\"", "unknown time unit \"uS\" in `units.output_time`. Did you mean `us`? " + _known + ".")]
    [InlineData("model_time = \"t0\"\n§output_time = \"s\"", "`units.output_time` does not apply here: a model time unit (\"t0\") has no conversion to other units; to write outputs in another unit, give the rates' unit as time = one of \"fs\", \"ps\", \"ns\", \"us\", \"ms\", \"s\", \"min\", \"h\"")]
    [InlineData("model_time = \"§ms\"", "\"ms\" is a time unit RateDeck converts; write time = \"ms\" instead of model_time")]
    public void BadTimeUnit_IsAnErrorAtItsValueSayingWhatToDo(string units, string message)
    {
        using var scratch = new DeckScratch();
        Assert.Equal(message, scratch.FailAt(DeckScratch.Valid(units: "energy = \"eV\"\n" + units)).Problem);
    }

    [Fact]
    public void ModelTimeUnit_IsCarriedAsItsNameWithoutConversion()
    {
        using var scratch = new DeckScratch();
        var deck = scratch.Parse(DeckScratch.Valid(units: "energy = \"eV\"\nmodel_time = \"t0\"", run: "t_end = 0.3"));
        Assert.Equal("t0", deck.TimeUnit);
        Assert.Null(deck.GivenTimeUnit);
        Assert.Equal(0.3, deck.Run.EndTime);
    }

    [Trait("Through", "program")]
    [Fact]
    public void Cli_UnknownTimeUnit_ExitsTwoWithFileLineAndColumn()
    {
        using var scratch = new DeckScratch();
        var (text, line, column) = DeckScratch.Unmark(DeckScratch.Valid(units: "energy = \"eV\"\ntime = \"§seconds\""));
        var path = scratch.Write("unknown-unit.toml", text);

        var (code, output, error) = CliRunner.Run("check", path);

        Assert.Equal(ExitCodes.BadInput, code);
        Assert.StartsWith($"{path}:{line}:{column}: unknown time unit \"seconds\"", (output + error).Trim());
    }
}
