using System.Buffers;
using System.Globalization;
using System.Runtime.CompilerServices;
using System.Text;
using RateDeck.Text;

namespace RateDeck.Decks;

/// <summary>
/// The rate file read straight from its bytes when it has the plain layout that generated and
/// exported files have: no byte-order mark, lines ending in LF or CR LF, comment lines starting
/// with <c>#</c>, a header naming from, to and rate without spaces, then rows of exactly three
/// unquoted ASCII cells without spaces, every row valid. Cells are looked up and numbers parsed on
/// spans, with the same lookup as <see cref="RateCsvReader"/> (<see cref="StateNames.TryResolve(ReadOnlySpan{char}, out int)"/>)
/// and the doubles its parse gives (<see cref="DecimalText"/>, else
/// <see cref="double.TryParse(ReadOnlySpan{char}, NumberStyles, IFormatProvider?, out double)"/>
/// with <see cref="NumberStyles.Float"/>, invariant culture), so the rows and their spans are
/// those it would give. Anything else (a quote, a space, a blank line, a non-ASCII cell, a byte
/// order mark, a bad row) returns null, and the general reader reads the file and words the
/// error at its line and column: this path never reports one itself.
/// </summary>
internal static class PlainRateCsv
{
    /// <summary>Longest state cell looked up here (labels are short; a longer one takes the general reader), and the room for a number's characters.</summary>
    private const int _longestCell = 128;

    /// <summary>Bytes a plain row may hold: printable ASCII but the space, the quote and the comment mark (a cell holds no separator by construction).</summary>
    private static readonly SearchValues<byte> _plainBytes = SearchValues.Create(
        [.. Enumerable.Range(0x21, 0x7F - 0x21).Where(b => b is not ('"' or '#')).Select(b => (byte)b)]);

    /// <summary>State numbers of up to this many digits are read here (18 fit a long; a longer one takes the general path).</summary>
    private const int _longestStateNumber = 18;

    private static readonly string[] _columns = ["from", "to", "rate"];

    /// <summary>The rows of <paramref name="bytes"/> (already checked as text), or null when the file is not plain or has a bad row.</summary>
    /// <remarks>
    /// Compiled optimised at once (<see cref="MethodImplOptions.AggressiveOptimization"/>), as are its
    /// helpers: the loop runs once per process over up to millions of rows, which would otherwise
    /// start in the unoptimised first tier of the JIT.
    /// </remarks>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static RateEntryTable? TryRead(string path, byte[] bytes, StateNames states, RateCsvReader.Rules rules)
    {
        ReadOnlySpan<byte> text = bytes;
        if (text.StartsWith((ReadOnlySpan<byte>)[0xEF, 0xBB, 0xBF]))
        {
            return null;
        }

        RateEntryTable? entries = null;
        var given = new PairSet(states.Count);
        Span<int> columnOf = stackalloc int[3];
        Span<Range> cells = stackalloc Range[3];
        Span<char> characters = stackalloc char[_longestCell];
        var (line, position) = (0, 0);
        while (position < text.Length)
        {
            line++;
            var lineStart = position;
            var length = text[position..].IndexOf((byte)'\n');
            var row = length < 0 ? text[position..] : text.Slice(position, length);
            position += length < 0 ? row.Length : length + 1;
            if (row.EndsWith((byte)'\r'))
            {
                row = row[..^1];
            }

            if (row.IsEmpty || row.Contains((byte)'\r'))
            {
                return null;
            }

            if (row[0] == (byte)'#')
            {
                continue;
            }

            if (entries is null)
            {
                if (!TryHeader(row, cells, columnOf))
                {
                    return null;
                }

                // One row a line: the line count bounds the rows, so the table is sized once.
                entries = new RateEntryTable(path, text.Count((byte)'\n') + 1);
                continue;
            }

            if (!TrySplit(row, cells))
            {
                return null;
            }

            var rateCell = cells[columnOf[2]];
            if (!TryState(row[cells[columnOf[0]]], states, characters, out var from)
                || !TryState(row[cells[columnOf[1]]], states, characters, out var to)
                || !TryNumber(row[rateCell], characters, out var rate)
                || !(rate >= 0 && double.IsFinite(rate))
                || from == to
                || (rules.Direction is { } direction && (direction == TransferDirection.TowardSmaller ? to > from : to < from))
                || !given.Add(from, to))
            {
                return null;
            }

            // ASCII from the line's start: the column is the byte offset plus one.
            entries.Add(from, to, rate, new SourceSpan(path, line, rateCell.Start.Value + 1));
        }

        return entries is { Count: > 0 } ? entries : null;
    }

    /// <summary>The header: each of from, to, rate once, no other cell; <paramref name="columnOf"/> gets their positions.</summary>
    private static bool TryHeader(ReadOnlySpan<byte> row, Span<Range> cells, Span<int> columnOf)
    {
        if (!TrySplit(row, cells))
        {
            return false;
        }

        columnOf.Fill(-1);
        for (var k = 0; k < cells.Length; k++)
        {
            var name = Encoding.ASCII.GetString(row[cells[k]]);
            var column = Array.IndexOf(_columns, name);
            if (column < 0 || columnOf[column] >= 0)
            {
                return false;
            }

            columnOf[column] = k;
        }

        return true;
    }

    /// <summary>Exactly three non-empty plain cells, their ranges into <paramref name="cells"/>.</summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static bool TrySplit(ReadOnlySpan<byte> row, Span<Range> cells)
    {
        var first = row.IndexOf((byte)',');
        if (first <= 0)
        {
            return false;
        }

        var second = row[(first + 1)..].IndexOf((byte)',') + first + 1;
        if (second <= first + 1 || second == row.Length - 1 || row.ContainsAnyExcept(_plainBytes))
        {
            return false;
        }

        if (row[(second + 1)..].Contains((byte)','))
        {
            return false;
        }

        cells[0] = ..first;
        cells[1] = (first + 1)..second;
        cells[2] = (second + 1)..row.Length;
        return true;
    }

    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static bool TryState(ReadOnlySpan<byte> cell, StateNames states, Span<char> characters, out int state)
    {
        state = -1;
        if (!states.HasNumberLabel && cell.Length <= _longestStateNumber && !cell.ContainsAnyExceptInRange((byte)'0', (byte)'9'))
        {
            // No label is all digits, so the cell is a state number; resolving it through the
            // labels first, as the general reader does, would find nothing.
            var number = 0L;
            foreach (var digit in cell)
            {
                number = (number * 10) + (digit - '0');
            }

            state = (int)Math.Clamp(number - 1, -1, int.MaxValue);
            return number >= 1 && number <= states.Count;
        }

        if (cell.Length > characters.Length)
        {
            return false;
        }

        var written = Encoding.ASCII.GetChars(cell, characters);
        return states.TryResolve(characters[..written], out state);
    }

    /// <summary>
    /// The number in <paramref name="cell"/>, the double the general reader's parse of the cell's
    /// text gives: by <see cref="DecimalText.TryParsePlain"/> when it decides, else by that parse.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    private static bool TryNumber(ReadOnlySpan<byte> cell, Span<char> characters, out double value)
    {
        if (DecimalText.TryParsePlain(cell, out value))
        {
            return true;
        }

        // A long cell (a decimal expansion of many digits, say) is rare: it may take a string.
        return cell.Length > characters.Length
            ? double.TryParse(Encoding.ASCII.GetString(cell), NumberStyles.Float, CultureInfo.InvariantCulture, out value)
            : double.TryParse(characters[..Encoding.ASCII.GetChars(cell, characters)], NumberStyles.Float, CultureInfo.InvariantCulture, out value);
    }
}
