using System.Globalization;
using System.Text;
using System.Text.Json;
using RateDeck.Decks;
using RateDeck.Text;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary>
/// The fast reading of plain rate files (<see cref="PlainRateCsv"/>, numbers by
/// <see cref="DecimalText"/>): its doubles against CPython's float() on hard decimal texts
/// (fixture written by tests/reference/decimal_text.py, Python version recorded there), its rows
/// and cell positions against the file's text counted by hand, and the layouts it leaves to the
/// general reader. Its errors are the general reader's (the malformed-input catalogue runs through it).
/// </summary>
public sealed class PlainRateCsvTests : IDisposable
{
    private static readonly List<(string Text, ulong Bits)> _pythonCases = ReadCases();

    private readonly DeckScratch _scratch = new();

    public void Dispose() => _scratch.Dispose();

    [Fact]
    public void Numbers_AreThoseOfPythonsFloat()
    {
        // Reference: CPython float(), correctly rounded (tests/reference/decimal_text.py).
        var decided = 0;
        foreach (var (text, bits) in _pythonCases)
        {
            double value;
            if (DecimalText.TryParsePlain(Encoding.ASCII.GetBytes(text), out value))
            {
                decided++;
            }
            else
            {
                value = double.Parse(text, NumberStyles.Float, CultureInfo.InvariantCulture);
            }

            Assert.True(BitConverter.DoubleToUInt64Bits(value) == bits, $"{text}: {value:R}, Python gives {BitConverter.UInt64BitsToDouble(bits):R}");
        }

        // The fast path must be what decides most texts, or the check above tests the fallback alone.
        Assert.True(decided > _pythonCases.Count / 2, $"the fast path decided {decided} of {_pythonCases.Count}");
    }

    [Fact]
    public void RateFile_OfHardNumbers_IsReadPlain_WithPythonsDoubles()
    {
        // Every finite case as the rate of one pair of a 120-state deck, toward the smaller state.
        var finite = _pythonCases.Where(c => double.IsFinite(BitConverter.UInt64BitsToDouble(c.Bits))).ToList();
        var pairs = (from source in Enumerable.Range(2, 119) from target in Enumerable.Range(1, source - 1) select (source, target)).Take(finite.Count).ToList();
        Assert.Equal(finite.Count, pairs.Count);
        var text = new StringBuilder("from,to,rate\n");
        for (var k = 0; k < finite.Count; k++)
        {
            text.Append(CultureInfo.InvariantCulture, $"{pairs[k].source},{pairs[k].target},{finite[k].Text}\n");
        }

        var states = new StateNames([.. Enumerable.Range(1, 120).Select(i => $"s{i}")]);
        var table = PlainRateCsv.TryRead("rates.csv", Encoding.ASCII.GetBytes(text.ToString()), states, new RateCsvReader.Rules(TransferDirection.TowardSmaller));

        Assert.NotNull(table);
        Assert.Equal(finite.Count, table.Count);
        for (var k = 0; k < finite.Count; k++)
        {
            Assert.Equal((pairs[k].source - 1, pairs[k].target - 1), (table[k].From, table[k].To));
            Assert.True(BitConverter.DoubleToUInt64Bits(table[k].Rate) == finite[k].Bits, $"row {k + 2}: {finite[k].Text}");
        }
    }

    [Fact]
    public void CrLfLines_Comments_AnyColumnOrder_LabelsAndNumbers_AreReadPlain()
    {
        // Lines and columns counted by hand in the text below.
        var text = "# measured at 300 K\r\nrate,to,from\r\n1.5e3,a,b\r\n# a note\r\n0.25,2,c\r\n";
        var states = new StateNames(["a", "b", "c"]);

        var table = PlainRateCsv.TryRead("r.csv", Encoding.ASCII.GetBytes(text), states, new RateCsvReader.Rules(TransferDirection.TowardSmaller));

        Assert.NotNull(table);
        Assert.Equal(new RateEntry(1, 0, 1500.0, new SourceSpan("r.csv", 3, 1)), table[0]);
        Assert.Equal(new RateEntry(2, 1, 0.25, new SourceSpan("r.csv", 5, 1)), table[1]);
    }

    [Fact]
    public void AllDigitLabels_WinOverStateNumbers()
    {
        // Common practice for these files (and the general reader's rule): a cell that is a label names that state.
        var states = new StateNames(["10", "20", "3"]);

        var table = PlainRateCsv.TryRead("r.csv", "from,to,rate\n3,1,2.0\n"u8.ToArray(), states, new RateCsvReader.Rules(null));

        Assert.NotNull(table);
        Assert.Equal((2, 0), (table[0].From, table[0].To));
    }

    [Theory]
    [InlineData("from,to,rate\nb,a,\"1.0\"\n")]
    [InlineData("from,to,rate\n b,a,1.0\n")]
    [InlineData("from, to, rate\nb,a,1.0\n")]
    [InlineData("from,to,rate\n\nb,a,1.0\n")]
    [InlineData("\uFEFFfrom,to,rate\nb,a,1.0\n")]
    [InlineData("from,to,rate\nb,a,1.0,\n")]
    [InlineData("from,to,rate\nb,a,-1.0\n")]
    [InlineData("from,to,rate\nb,a,1.0\nb,a,2.0\n")]
    [InlineData("from,to,rate\na,b,1.0\n")]
    [InlineData("from,to,rate\n")]
    public void OtherLayouts_AndBadRows_AreLeftToTheGeneralReader(string text)
    {
        var states = new StateNames(["a", "b", "c"]);

        Assert.Null(PlainRateCsv.TryRead("r.csv", Encoding.UTF8.GetBytes(text), states, new RateCsvReader.Rules(TransferDirection.TowardSmaller)));
    }

    [Fact]
    public void QuotedCells_StillRead_ThroughTheGeneralReader()
    {
        _scratch.Write("rates.csv", "from,to,rate\n\"b\",a,1.0\r\nc,\"b\",\"2.0\"\n");

        var coupling = Assert.IsType<MeasuredOneWay>(_scratch.Parse(DeckScratch.Valid()).Coupling);

        Assert.Equal([(1, 0, 1.0), (2, 1, 2.0)], coupling.Entries.Select(e => (e.From, e.To, e.Rate)));
    }

    private static List<(string Text, ulong Bits)> ReadCases()
    {
        using var fixture = JsonDocument.Parse(File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "fixtures", "decimal-text.json")));
        return [.. fixture.RootElement.GetProperty("cases").EnumerateArray()
            .Select(c => (c[0].GetString()!, ulong.Parse(c[1].GetString()!, NumberStyles.HexNumber, CultureInfo.InvariantCulture)))];
    }
}
