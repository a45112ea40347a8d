namespace RateDeck.Tests.Support;

/// <summary>A fresh empty folder under the system temp path, deleted on dispose.</summary>
/// <param name="inMemoryWhenPossible">
/// Put the folder in /dev/shm when the system has it: a test that writes thousands of small files
/// then costs no disk time, which a busy disk would make long and uneven.
/// </param>
internal sealed class TempFolder(bool inMemoryWhenPossible = false) : IDisposable
{
    public string Path { get; } = inMemoryWhenPossible && Directory.Exists("/dev/shm")
        ? Directory.CreateDirectory(System.IO.Path.Combine("/dev/shm", "ratedeck-test-" + Guid.NewGuid().ToString("N"))).FullName
        : Directory.CreateTempSubdirectory("ratedeck-test-").FullName;

    public string File(string name) => System.IO.Path.Combine(Path, name);

    public string[] Entries() => Directory.GetFileSystemEntries(Path).Select(System.IO.Path.GetFileName).ToArray()!;

    public void Dispose() => Directory.Delete(Path, recursive: true);
}
