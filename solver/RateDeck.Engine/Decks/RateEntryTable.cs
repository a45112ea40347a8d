using System.Collections;

namespace RateDeck.Decks;

/// <summary>
/// The rows of a rate file held compactly: from, to, rate, line and column in parallel arrays,
/// 24 bytes a row instead of one object each (a dense 4000-state deck has 8 million rows). A
/// <see cref="RateEntry"/> is made when a row is read, and the file name is shared by all.
/// </summary>
internal sealed class RateEntryTable(string file, int capacity) : IReadOnlyList<RateEntry>
{
    private int[] _from = new int[Math.Max(capacity, 4)];
    private int[] _to = new int[Math.Max(capacity, 4)];
    private double[] _rate = new double[Math.Max(capacity, 4)];
    private int[] _line = new int[Math.Max(capacity, 4)];
    private int[] _column = new int[Math.Max(capacity, 4)];

    public int Count { get; private set; }

    public RateEntry this[int index] => (uint)index < (uint)Count
        ? new RateEntry(_from[index], _to[index], _rate[index], new SourceSpan(file, _line[index], _column[index]))
        : throw new ArgumentOutOfRangeException(nameof(index));

    /// <summary>
    /// The from, to and rate columns of <paramref name="entries"/> (the first Count items of each
    /// array count): a table's own arrays, shared, else copies. The assembler's loop reads these
    /// instead of making a <see cref="RateEntry"/> per row.
    /// </summary>
    public static (int[] From, int[] To, double[] Rate, int Count) Columns(IReadOnlyList<RateEntry> entries)
    {
        if (entries is RateEntryTable table)
        {
            return (table._from, table._to, table._rate, table.Count);
        }

        var copy = new RateEntryTable("", entries.Count);
        foreach (var entry in entries)
        {
            copy.Add(entry.From, entry.To, entry.Rate, entry.Span);
        }

        return Columns(copy);
    }

    /// <summary>Appends a row whose rate cell is at <paramref name="span"/>.</summary>
    public void Add(int from, int to, double rate, SourceSpan span)
    {
        if (Count == _from.Length)
        {
            var size = Count * 2;
            Array.Resize(ref _from, size);
            Array.Resize(ref _to, size);
            Array.Resize(ref _rate, size);
            Array.Resize(ref _line, size);
            Array.Resize(ref _column, size);
        }

        (_from[Count], _to[Count], _rate[Count], _line[Count], _column[Count]) = (from, to, rate, span.Line, span.Column);
        Count++;
    }

    /// <summary>The line of the first row from <paramref name="from"/> to <paramref name="to"/>, or 0 when there is none.</summary>
    public int FirstLineOf(int from, int to)
    {
        for (var k = 0; k < Count; k++)
        {
            if (_from[k] == from && _to[k] == to)
            {
                return _line[k];
            }
        }

        return 0;
    }

    public IEnumerator<RateEntry> GetEnumerator()
    {
        for (var k = 0; k < Count; k++)
        {
            yield return this[k];
        }
    }

    IEnumerator IEnumerable.GetEnumerator() => GetEnumerator();
}
