using System.Text;
using CsvHelper;

namespace RateDeck.Decks;

/// <summary>The file's bytes, to turn byte offsets into one-based lines and character columns.</summary>
internal sealed class CsvFile(string path, byte[] bytes)
{
    private int _cursor;
    private int _cursorLine = 1;
    private int _cursorLineStart;

    public string Path { get; } = path;

    /// <summary>Number of line breaks, plus one.</summary>
    public int LineCount => bytes.AsSpan().Count((byte)'\n') + 1;

    /// <summary>
    /// The span of cell <paramref name="index"/> of the current record: its first character
    /// after leading spaces. The raw fields joined by separators are the raw record, so the
    /// cell starts after the raw fields before it and one separator each.
    /// </summary>
    public SourceSpan Cell(CsvReader reader, int index)
    {
        var offset = reader.ByteOffset;
        for (var k = 0; k < index; k++)
        {
            offset += reader.GetRawSpan(k).Length + 1;
        }

        var raw = reader.GetRawSpan(index);
        var lead = 0;
        while (lead < raw.Length && raw[lead] is (byte)' ' or (byte)'\t')
        {
            lead++;
        }

        return SpanAtByte(offset + lead);
    }

    /// <summary>
    /// Line and column of a byte offset. Lines are counted from a cursor left by the previous
    /// call (restarting from the top only when asked for an earlier line), so that reading a
    /// file cell by cell costs O(file size) in all, not O(size) per cell.
    /// </summary>
    public SourceSpan SpanAtByte(long offset)
    {
        var end = (int)Math.Clamp(offset, 0, bytes.Length);
        if (end < _cursorLineStart)
        {
            (_cursor, _cursorLine, _cursorLineStart) = (0, 1, 0);
        }

        var newline = _cursor >= end ? -1 : bytes.AsSpan(_cursor, end - _cursor).LastIndexOf((byte)'\n');
        if (newline >= 0)
        {
            _cursorLine += bytes.AsSpan(_cursor, newline + 1).Count((byte)'\n');
            _cursorLineStart = _cursor + newline + 1;
        }

        _cursor = Math.Max(_cursor, end);
        var (line, lineStart) = (_cursorLine, _cursorLineStart);

        // Skip a byte order mark so that columns count what an editor shows.
        var bom = lineStart == 0 && bytes.AsSpan().StartsWith((ReadOnlySpan<byte>)[0xEF, 0xBB, 0xBF]) ? 3 : 0;
        var from = Math.Min(lineStart + bom, end);
        var column = Encoding.UTF8.GetCharCount(bytes, from, end - from) + 1;
        return new SourceSpan(Path, line, column);
    }
}
