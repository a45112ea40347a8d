using RateDeck.Decks;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary>Problems in a coefficient file are reported as <c>csvfile:line:column</c> of the offending cell.</summary>
public sealed class RateCsvTests : IDisposable
{
    private readonly DeckScratch _scratch = new();

    public void Dispose() => _scratch.Dispose();

    [Fact]
    public void OneWayRates_AreReadWithZeroBasedStatesAndCellSpans()
    {
        var deck = _scratch.Parse(DeckScratch.Valid());
        var coupling = Assert.IsType<MeasuredOneWay>(deck.Coupling);
        Assert.Equal(TransferDirection.TowardSmaller, coupling.Direction);
        Assert.Equal(3, coupling.Entries.Count);
        Assert.Equal(new RateEntry(1, 0, 1.0, new SourceSpan(Path.Combine(_scratch.Directory, "rates.csv"), 2, 5)), coupling.Entries[0]);
        Assert.Equal((2, 0, 0.5), (coupling.Entries[2].From, coupling.Entries[2].To, coupling.Entries[2].Rate));
    }

    [Fact]
    public void StateNumbers_CommentsAndSpaces_AreAccepted()
    {
        _scratch.Write("rates.csv", "# measured\nfrom, to, rate\n 2 , 1 , 1.5e3\n3,b,2\n");
        var coupling = Assert.IsType<MeasuredOneWay>(_scratch.Parse(DeckScratch.Valid()).Coupling);
        Assert.Equal((1, 0, 1500.0), (coupling.Entries[0].From, coupling.Entries[0].To, coupling.Entries[0].Rate));
        Assert.Equal(10, coupling.Entries[0].Span.Column);
        Assert.Equal((2, 1), (coupling.Entries[1].From, coupling.Entries[1].To));
    }

    [Fact]
    public void NegativeRate_IsReportedAtTheCell()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,a,1.0\nc,b,§-2.0\n");
        Assert.Contains("cannot be negative", error.Problem);
        Assert.Equal(3, error.Span.Line);
        Assert.Equal(5, error.Span.Column);
    }

    [Fact]
    public void NaNRate_IsReportedAtTheCell()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,a,§NaN\n");
        Assert.Contains("cannot be NaN", error.Problem);
    }

    [Fact]
    public void InfiniteRate_IsReportedAtTheCell()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,a,§Infinity\n");
        Assert.Contains("finite", error.Problem);
    }

    [Fact]
    public void TextRate_IsNotANumber()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,a,  §fast\n");
        Assert.Contains("`fast` is not a number", error.Problem);
    }

    [Fact]
    public void RateAgainstTheDeclaredDirection_IsReportedAtTheTargetCell()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,a,1.0\na,§c,1.0\n");
        Assert.Contains("against the declared direction = \"toward_smaller\"", error.Problem);
    }

    [Fact]
    public void DiagonalEntry_IsRejected()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,§b,1.0\n");
        Assert.Contains("cannot have a rate to itself", error.Problem);
    }

    [Fact]
    public void DiagonalEntryInAFullMatrix_IsRejected()
    {
        var deck = DeckScratch.Valid(transfer: "kind = \"full\"\ncsv = \"rates.csv\"");
        var error = _scratch.CsvFailAt("from,to,rate\na,b,1.0\nb,a,1.0\n3,§c,1.0\n", deck);
        Assert.Contains("cannot have a rate to itself", error.Problem);
    }

    [Fact]
    public void RepeatedPair_IsRejectedAtTheSecondRow()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,a,1.0\nc,b,2.0\n§2,a,3.0\n");
        Assert.Contains("already given on line 2", error.Problem);
    }

    [Fact]
    public void UnknownLabel_SuggestsTheClosestLabel()
    {
        var deck = DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"ground\", \"middle\", \"upper\"]");
        var error = _scratch.CsvFailAt("from,to,rate\n§uper,middle,1.0\n", deck);
        Assert.Contains("unknown state `uper`. Did you mean `upper`?", error.Problem);
    }

    [Fact]
    public void StateNumberOutOfRange_IsRejected()
    {
        var error = _scratch.CsvFailAt("from,to,rate\n§9,1,1.0\n");
        Assert.Contains("numbered 1..3", error.Problem);
    }

    [Fact]
    public void FullMatrixRatesInBothDirections_AreAccepted()
    {
        _scratch.Write("rates.csv", "from,to,rate\na,b,1.0\nb,a,2.0\n");
        var deck = _scratch.Parse(DeckScratch.Valid(transfer: "kind = \"full\"\ncsv = \"rates.csv\""));
        Assert.Equal(2, Assert.IsType<MeasuredFull>(deck.Coupling).Entries.Count);
    }

    [Fact]
    public void UnknownColumn_SuggestsTheColumnName()
    {
        var error = _scratch.CsvFailAt("from,to,§rates\nb,a,1.0\n");
        Assert.Contains("unknown column `rates`. Did you mean `rate`?", error.Problem);
    }

    [Fact]
    public void MissingColumn_IsReportedOnTheHeaderLine()
    {
        var error = _scratch.CsvFailAt("# two columns only\n§from,to\nb,a\n");
        Assert.Contains("lacks the column `rate`", error.Problem);
    }

    [Fact]
    public void ExtraCell_IsReportedAtTheExtraCell()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,a,1.0,§0.1\n");
        Assert.Contains("this row has 4 cells", error.Problem);
    }

    [Fact]
    public void EmptyCell_IsReported()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,§,1.0\n");
        Assert.Contains("this cell is empty", error.Problem);
    }

    [Fact]
    public void HeaderWithoutRows_IsRejected()
    {
        var error = _scratch.CsvFailAt("§from,to,rate\n");
        Assert.Contains("no rates", error.Problem);
    }

    [Fact]
    public void EmptyFile_IsRejected()
    {
        _scratch.Write("rates.csv", "");
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid()));
        Assert.Equal(new SourceSpan(Path.Combine(_scratch.Directory, "rates.csv"), 1, 1), error.Span);
    }

    [Fact]
    public void MalformedQuoting_IsReportedNearTheProblem()
    {
        var error = _scratch.CsvFailAt("from,to,rate\nb,a,1.0\nc,\"b\"§x,2.0\n");
        Assert.StartsWith("the CSV cannot be read", error.Problem);
    }
}
