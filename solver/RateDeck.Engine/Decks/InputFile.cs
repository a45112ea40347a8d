using System.Buffers;
using System.Runtime.InteropServices;
using System.Text.Unicode;
using Microsoft.Win32.SafeHandles;

namespace RateDeck.Decks;

/// <summary>
/// Reads an input file (a deck or the rate CSV it names) whole, and only when it is a plain text
/// file a user could have written: a regular file (not a pipe, device or socket, which could block
/// or never end), at most <see cref="MaxBytes"/> long, valid UTF-8 without control characters
/// other than tab, carriage return and line feed. Every refusal is a <see cref="DeckException"/>:
/// at the offending byte when the content is at fault, otherwise at the reference the caller
/// gives (the deck key naming the file, or the file itself).
/// </summary>
internal static partial class InputFile
{
    /// <summary>
    /// The largest input read: 1 GiB, about eight times a dense 2000-state rate table written with
    /// full precision. A larger file is refused before anything is read.
    /// </summary>
    public const long MaxBytes = 1L << 30;

    /// <summary>The C0 controls but tab, line feed and carriage return, and DEL.</summary>
    private static readonly SearchValues<byte> _controlBytes = SearchValues.Create(
        [.. Enumerable.Range(0, 32).Where(c => c is not ('\t' or '\n' or '\r')).Select(c => (byte)c), (byte)0x7f]);

    // Linux open(2) flags (the same values on x86-64 and AArch64).
    private const int _openReadOnly = 0, _openNonBlocking = 0x800, _openCloseOnExec = 0x80000;

    /// <summary>
    /// The bytes of <paramref name="path"/>. <paramref name="describe"/> turns a reason such as
    /// "there is no such file" into the exception to throw.
    /// </summary>
    public static byte[] ReadAllBytes(string path, Func<string, DeckException> describe)
    {
        if (path.Contains('\0', StringComparison.Ordinal))
        {
            throw describe("the path contains a NUL character; write the file name without it");
        }

        try
        {
            using var stream = OpenWithoutBlocking(path);
            // A pipe or a socket cannot seek; a device reports a size its content does not keep to.
            // Both are refused rather than read, since a read could wait or go on for ever.
            if (!stream.CanSeek)
            {
                throw describe("it is a pipe, socket or device, not a regular file; give the path of a file");
            }

            var length = stream.Length;
            if (length > MaxBytes)
            {
                throw describe($"it is {length} bytes long, more than the {MaxBytes} bytes an input may have");
            }

            var bytes = new byte[length];
            stream.ReadExactly(bytes);
            if (stream.ReadByte() >= 0)
            {
                throw describe("it holds more bytes than its size says: a device, not a regular file, or a file still being written; give the path of a finished file");
            }

            return bytes;
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw describe(e is FileNotFoundException or DirectoryNotFoundException ? "there is no such file" : e.Message);
        }
    }

    /// <summary>The text of a file's bytes (a leading byte-order mark dropped), checked as by <see cref="CheckText"/>.</summary>
    public static string DecodeText(byte[] bytes, string path)
    {
        CheckText(bytes, path);
        return System.Text.Encoding.UTF8.GetString(WithoutByteOrderMark(bytes));
    }

    /// <summary>
    /// Refuses invalid UTF-8 or a control character at its line and column: such bytes mean a
    /// binary or damaged file, and number parsers would otherwise skip some of them silently (a
    /// NUL after a number, say). Works on the bytes: a control character is one byte in UTF-8,
    /// and no byte of a longer sequence looks like one.
    /// </summary>
    public static void CheckText(byte[] bytes, string path)
    {
        var content = WithoutByteOrderMark(bytes);
        if (!Utf8.IsValid(content))
        {
            var chars = new char[content.Length];
            Utf8.ToUtf16(content, chars, out var bytesRead, out _, replaceInvalidSequences: false);
            throw new DeckException(Locate(content, bytesRead, path), $"byte 0x{content[bytesRead]:X2} is not valid UTF-8; save the file as UTF-8 text");
        }

        var control = content.IndexOfAny(_controlBytes);
        if (control >= 0)
        {
            throw new DeckException(Locate(content, control, path), $"control character U+{content[control]:X4} in the text; the file must be plain text (is it binary or damaged?)");
        }
    }

    private static ReadOnlySpan<byte> WithoutByteOrderMark(byte[] bytes) => bytes.AsSpan(bytes is [0xEF, 0xBB, 0xBF, ..] ? 3 : 0);

    /// <summary>One-based line and column (in characters, as an editor counts them) of the byte at <paramref name="offset"/>; the prefix is valid UTF-8.</summary>
    private static SourceSpan Locate(ReadOnlySpan<byte> content, int offset, string path)
    {
        var before = content[..offset];
        var lineStart = before.LastIndexOf((byte)'\n') + 1;
        var column = System.Text.Encoding.UTF8.GetCharCount(before[lineStart..]) + 1;
        return new SourceSpan(path, before.Count((byte)'\n') + 1, column);
    }

    /// <summary>
    /// Opens for reading. On Linux the file is opened with O_NONBLOCK, so that a FIFO without a
    /// writer is opened (and then refused) instead of blocking the open for ever; the flag changes
    /// nothing for a regular file.
    /// </summary>
    private static FileStream OpenWithoutBlocking(string path)
    {
        if (!OperatingSystem.IsLinux())
        {
            return new FileStream(path, FileMode.Open, FileAccess.Read, FileShare.Read, bufferSize: 1);
        }

        var descriptor = Open(Path.GetFullPath(path), _openReadOnly | _openNonBlocking | _openCloseOnExec);
        if (descriptor < 0)
        {
            var error = Marshal.GetLastPInvokeError();
            // ENOENT and ENOTDIR: nothing there; anything else reads as the system says.
            throw error is 2 or 20
                ? new FileNotFoundException(path)
                : new IOException(Marshal.GetPInvokeErrorMessage(error));
        }

        var handle = new SafeFileHandle(descriptor, ownsHandle: true);
        try
        {
            return new FileStream(handle, FileAccess.Read, bufferSize: 1);
        }
        catch
        {
            handle.Dispose();
            throw;
        }
    }

    [LibraryImport("libc", EntryPoint = "open", SetLastError = true, StringMarshalling = StringMarshalling.Utf8)]
    private static partial int Open(string path, int flags);
}
