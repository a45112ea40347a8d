namespace RateDeck.Tests.Support;

/// <summary>A fresh empty folder under the system temp path, deleted on dispose.</summary>
internal sealed class TempFolder : IDisposable
{
    public TempFolder()
    {
        Path = Directory.CreateTempSubdirectory("ratedeck-test-").FullName;
    }

    public string Path { get; }

    public string File(string name) => System.IO.Path.Combine(Path, name);

    public string[] Entries() => Directory.GetFileSystemEntries(Path).Select(System.IO.Path.GetFileName).ToArray()!;

    public void Dispose() => Directory.Delete(Path, recursive: true);
}
