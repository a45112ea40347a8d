namespace RateDeck.Outputs;

/// <summary>
/// The temporary files and folders that outputs have in progress (an <see cref="AtomicFile"/>'s
/// hidden file, a <see cref="StagedOutputFolder"/>'s staging folder), so that a process stopped by
/// SIGINT or SIGTERM can remove them before it exits (<see cref="RemoveAllAndExit"/>). Renames into
/// place and commits run under <see cref="Hold"/>, so a stop never lands half-way through one.
/// A SIGKILL cannot be caught: what it leaves is hidden, and the next run into the same folder
/// removes a stale staging folder.
/// </summary>
public static class TemporaryPaths
{
    private static readonly HashSet<string> _paths = new(StringComparer.Ordinal);
    private static readonly Lock _guard = new();

    /// <summary>Records <paramref name="path"/> as in progress until the returned handle is disposed.</summary>
    public static IDisposable Track(string path)
    {
        lock (_guard)
        {
            _paths.Add(path);
        }

        return new Handle(() =>
        {
            lock (_guard)
            {
                _paths.Remove(path);
            }
        });
    }

    /// <summary>Holds off a stop until the returned handle is disposed: wrap a rename into place in it.</summary>
    public static IDisposable Hold()
    {
        _guard.Enter();
        return new Handle(_guard.Exit);
    }

    /// <summary>
    /// Deletes every path in progress and ends the process with <paramref name="exitCode"/>, holding
    /// the guard to the end so that no writer renames or commits anything after the removal.
    /// </summary>
    public static void RemoveAllAndExit(int exitCode)
    {
        _guard.Enter();
        foreach (var path in _paths)
        {
            TryDelete(path);
        }

        Environment.Exit(exitCode);
    }

    /// <summary>Waits while a stop is in progress (it then never returns): the signal's exit code wins over the verb's.</summary>
    public static void WaitForStop()
    {
        lock (_guard)
        {
            // Nothing to do: taking the guard is the wait.
        }
    }

    /// <summary>Deletes a file or folder if it exists (best effort).</summary>
    internal static void TryDelete(string path)
    {
        try
        {
            if (Directory.Exists(path))
            {
                Directory.Delete(path, recursive: true);
            }
            else
            {
                File.Delete(path);
            }
        }
        catch (IOException)
        {
            // Best effort: a path that cannot be removed now is hidden, and the next run removes a staging folder.
        }
        catch (UnauthorizedAccessException)
        {
            // Same reason as above.
        }
    }

    private sealed class Handle(Action release) : IDisposable
    {
        private Action? _release = release;

        public void Dispose()
        {
            _release?.Invoke();
            _release = null;
        }
    }
}
