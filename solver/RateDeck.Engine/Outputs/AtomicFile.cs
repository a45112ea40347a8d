using System.Security.Cryptography;
using System.Text;

namespace RateDeck.Outputs;

/// <summary>
/// Writes a file so that readers see either the old content or the complete new content, never a
/// half-written file: the content goes to a hidden temporary file in the same folder
/// (<c>.name.tmp-XXXXXXXX</c>), is flushed to disk, and only then renamed over the target. A rename
/// within one folder is atomic on POSIX file systems and on NTFS. When the writer throws, the
/// temporary file is deleted and the target is left as it was; a run stopped by SIGINT or SIGTERM
/// deletes it too (<see cref="TemporaryPaths"/>).
/// </summary>
public static class AtomicFile
{
    /// <summary>UTF-8 without a byte-order mark, the encoding of every text output.</summary>
    public static readonly Encoding TextEncoding = new UTF8Encoding(encoderShouldEmitUTF8Identifier: false);

    /// <summary>
    /// Writes text through <paramref name="write"/> (UTF-8, no BOM, <c>\n</c> line ends) and puts it
    /// in place at <paramref name="path"/>. The folder must exist. With <paramref name="overwrite"/>
    /// false an existing file at <paramref name="path"/> is left alone and an <see cref="IOException"/> thrown.
    /// </summary>
    public static void Write(string path, Action<TextWriter> write, bool overwrite = true)
    {
        ArgumentNullException.ThrowIfNull(write);
        WriteBytes(path, overwrite, stream =>
        {
            using var writer = new StreamWriter(stream, TextEncoding, bufferSize: 1 << 16, leaveOpen: true) { NewLine = "\n" };
            write(writer);
            writer.Flush();
        });
    }

    /// <summary>
    /// Writes bytes through <paramref name="write"/> and puts them in place at
    /// <paramref name="path"/>. The stream must not be disposed by the callback. The folder must exist.
    /// </summary>
    public static void WriteBytes(string path, Action<Stream> write) => WriteBytes(path, overwrite: true, write);

    private static void WriteBytes(string path, bool overwrite, Action<Stream> write)
    {
        ArgumentException.ThrowIfNullOrEmpty(path);
        ArgumentNullException.ThrowIfNull(write);
        var target = Path.GetFullPath(path);
        var folder = Path.GetDirectoryName(target) ?? throw new ArgumentException($"'{path}' names no file.", nameof(path));
        var temporary = Path.Combine(folder, $".{Path.GetFileName(target)}.tmp-{Convert.ToHexStringLower(RandomNumberGenerator.GetBytes(4))}");
        using var tracking = TemporaryPaths.Track(temporary);
        try
        {
            using (var stream = new FileStream(temporary, FileMode.CreateNew, FileAccess.Write, FileShare.None))
            {
                write(stream);
                // Flush to the device before the rename, so that a crash cannot leave the new name
                // pointing at content that never reached the disk.
                stream.Flush(flushToDisk: true);
            }
            using (TemporaryPaths.Hold())
            {
                File.Move(temporary, target, overwrite);
            }
        }
        catch
        {
            TemporaryPaths.TryDelete(temporary);
            throw;
        }
    }
}
