using System.Security.Cryptography;

namespace RateDeck.Outputs;

/// <summary>
/// An output folder that a run's files enter all together or not at all. The files are written
/// into a hidden staging folder inside it (<c>.ratedeck-staging-XXXXXXXX</c>: the same file system,
/// so every move is a rename) and <see cref="Commit"/> moves them into place; a run that stops
/// before that (an error, SIGINT, SIGTERM) leaves the folder as the earlier run left it. The commit
/// renames each file over its earlier version, then removes the files the earlier run wrote and
/// this one did not, as listed in <see cref="ListName"/>, so new populations never sit beside an
/// older run's plots. Files no run wrote (a user's notes) are left alone, and the folder itself is
/// never renamed or removed once it holds anything but this run's files (it may be the working
/// directory).
/// <para>
/// One run at a time writes a folder: the list file is held with an exclusive advisory lock, which
/// the system releases even when the process is killed, and a second run refuses plainly with
/// <see cref="OutputFolderBusyException"/>. The commit holds <see cref="TemporaryPaths"/>' guard,
/// so a SIGINT or SIGTERM handler waits for it to finish: the folder is then wholly old or wholly
/// new. A staging folder left by a SIGKILL is removed by the next run into the folder.
/// </para>
/// </summary>
public sealed class StagedOutputFolder : IDisposable
{
    /// <summary>The hidden file that lists the files of the last complete run, one a line, and is locked while a run writes the folder.</summary>
    public const string ListName = ".ratedeck-run";

    private const string _stagingPrefix = ".ratedeck-staging-";

    private readonly string _target;
    private readonly FileStream _list;
    private readonly IDisposable _stagingTracked;
    private readonly IDisposable? _targetTracked;
    private readonly List<string> _written = [];
    private bool _committed;

    private StagedOutputFolder(string target, FileStream list, bool created)
    {
        _target = target;
        _list = list;
        // A folder this run created holds nothing of anyone else's until the commit: a stopped run removes it whole.
        _targetTracked = created ? TemporaryPaths.Track(target) : null;
        StagingPath = Path.Combine(target, _stagingPrefix + Convert.ToHexStringLower(RandomNumberGenerator.GetBytes(4)));
        _stagingTracked = TemporaryPaths.Track(StagingPath);
        Directory.CreateDirectory(StagingPath);
    }

    /// <summary>The hidden staging folder the files are written into before the commit.</summary>
    public string StagingPath { get; }

    /// <summary>The names of the files staged so far, in the order staged.</summary>
    public IReadOnlyList<string> Written => _written;

    /// <summary>Creates <paramref name="folder"/> if need be, locks it for this run and creates the staging folder.</summary>
    /// <exception cref="OutputFolderBusyException">Another run is writing the same folder.</exception>
    /// <exception cref="IOException">The path names a file, or the folder cannot be created.</exception>
    public static StagedOutputFolder Begin(string folder)
    {
        ArgumentException.ThrowIfNullOrEmpty(folder);
        var target = Path.TrimEndingDirectorySeparator(Path.GetFullPath(folder));
        if (File.Exists(target))
        {
            throw new IOException($"'{folder}' is a file, not a folder; give a folder with --out");
        }

        var created = !Directory.Exists(target);
        Directory.CreateDirectory(target);
        FileStream list;
        try
        {
            // FileShare.None takes an exclusive advisory lock on Unix (flock): a second open fails at once.
            list = new FileStream(Path.Combine(target, ListName), FileMode.OpenOrCreate, FileAccess.ReadWrite, FileShare.None);
        }
        catch (IOException e) when (e is not FileNotFoundException and not DirectoryNotFoundException)
        {
            throw new OutputFolderBusyException($"another run is writing {folder} now; wait for it to finish or give another --out");
        }

        foreach (var stale in Directory.EnumerateDirectories(target, _stagingPrefix + "*"))
        {
            TemporaryPaths.TryDelete(stale);
        }

        return new StagedOutputFolder(target, list, created);
    }

    /// <summary>The staging path of the output file <paramref name="name"/>, recorded as written by this run.</summary>
    public string PathOf(string name)
    {
        if (Path.GetFileName(name) != name || name is "." or ".." or ListName)
        {
            throw new ArgumentException($"'{name}' is not a plain output file name", nameof(name));
        }

        _written.Add(name);
        return Path.Combine(StagingPath, name);
    }

    /// <summary>
    /// Moves every staged file into the folder, removes what the earlier run wrote and this one did
    /// not, and lists this run's files in <see cref="ListName"/>.
    /// </summary>
    public void Commit()
    {
        using (TemporaryPaths.Hold())
        {
            var earlier = ReadList();
            foreach (var name in _written)
            {
                File.Move(Path.Combine(StagingPath, name), Path.Combine(_target, name), overwrite: true);
            }

            foreach (var name in earlier.Except(_written, StringComparer.Ordinal))
            {
                // Only a plain name in this folder: the list is a text file a user could edit.
                if (Path.GetFileName(name) == name && name is not ("." or ".." or ListName))
                {
                    TemporaryPaths.TryDelete(Path.Combine(_target, name));
                }
            }

            WriteList();
            Directory.Delete(StagingPath);
            _committed = true;
        }
    }

    /// <summary>Removes the staging folder (and the folder, when this run created it) unless committed; releases the lock.</summary>
    public void Dispose()
    {
        if (!_committed)
        {
            TemporaryPaths.TryDelete(_targetTracked is null ? StagingPath : _target);
        }

        _stagingTracked.Dispose();
        _targetTracked?.Dispose();
        _list.Dispose();
    }

    private List<string> ReadList()
    {
        _list.Position = 0;
        using var reader = new StreamReader(_list, AtomicFile.TextEncoding, detectEncodingFromByteOrderMarks: false, leaveOpen: true);
        var names = new List<string>();
        while (reader.ReadLine() is { } line)
        {
            if (line.Length > 0)
            {
                names.Add(line);
            }
        }

        return names;
    }

    // Rewritten in place, since the open handle is the lock; only a SIGKILL in these few bytes could
    // cut it short, and then the next run merely removes fewer of this run's files.
    private void WriteList()
    {
        _list.SetLength(0);
        _list.Position = 0;
        using (var writer = new StreamWriter(_list, AtomicFile.TextEncoding, bufferSize: 4096, leaveOpen: true) { NewLine = "\n" })
        {
            foreach (var name in _written)
            {
                writer.WriteLine(name);
            }
        }

        _list.Flush(flushToDisk: true);
    }
}

/// <summary>Another run is writing the output folder; the message says what to do.</summary>
public sealed class OutputFolderBusyException : IOException
{
    /// <summary>Creates the exception with a message that says what to do.</summary>
    public OutputFolderBusyException(string message)
        : base(message)
    {
    }
}
