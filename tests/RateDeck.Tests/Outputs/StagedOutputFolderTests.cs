using RateDeck.Outputs;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Outputs;

/// <summary>
/// A run's files enter the output folder all together or not at all, one run at a time (issue 9
/// §7-8; staging then rename is common practice for atomic output).
/// </summary>
public sealed class StagedOutputFolderTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    private string Output => _folder.File("out");

    private void CommitRun(params (string Name, string Content)[] files)
    {
        using var staging = StagedOutputFolder.Begin(Output);
        foreach (var (name, content) in files)
        {
            File.WriteAllText(staging.PathOf(name), content);
        }

        staging.Commit();
    }

    private void RunFailingAfterItsFirstFile()
    {
        using var staging = StagedOutputFolder.Begin(Output);
        File.WriteAllText(staging.PathOf("a.csv"), "new a");
        throw new InvalidOperationException("disk full (simulated)");
    }

    private string[] Entries() => Directory.GetFileSystemEntries(Output).Select(Path.GetFileName).Order(StringComparer.Ordinal).ToArray()!;

    [Fact]
    public void RunFailingBeforeItsCommit_LeavesTheEarlierFilesAndNoStagingFolder()
    {
        CommitRun(("a.csv", "old a"), ("b.png", "old b"));
        var before = Entries();

        Assert.Throws<InvalidOperationException>(RunFailingAfterItsFirstFile);

        Assert.Equal(before, Entries());
        Assert.Equal("old a", File.ReadAllText(Path.Combine(Output, "a.csv")));
    }

    [Fact]
    public void RunFailingIntoAFolderItCreated_LeavesNoFolder()
    {
        Assert.Throws<InvalidOperationException>(RunFailingAfterItsFirstFile);

        Assert.False(Directory.Exists(Output));
    }

    [Fact]
    public void Commit_RemovesWhatTheEarlierRunWroteAndThisOneDidNot_AndKeepsForeignFiles()
    {
        CommitRun(("populations-exact.csv", "old"), ("populations-rk4.csv", "old"));
        File.WriteAllText(Path.Combine(Output, "notes.txt"), "mine");

        CommitRun(("populations-exact.csv", "new"));

        Assert.Equal([StagedOutputFolder.ListName, "notes.txt", "populations-exact.csv"], Entries());
        Assert.Equal("new", File.ReadAllText(Path.Combine(Output, "populations-exact.csv")));
        Assert.Equal(["populations-exact.csv"], File.ReadAllLines(Path.Combine(Output, StagedOutputFolder.ListName)));
    }

    [Fact]
    public void SecondRunIntoTheSameFolder_RefusesPlainlyWhileTheFirstWrites()
    {
        using var first = StagedOutputFolder.Begin(Output);

        var refusal = Assert.Throws<OutputFolderBusyException>(() => StagedOutputFolder.Begin(Output));

        Assert.Contains("another run is writing", refusal.Message, StringComparison.Ordinal);
        Assert.Contains("another --out", refusal.Message, StringComparison.Ordinal);
    }

    [Fact]
    public void NextRun_RemovesAStagingFolderLeftByAKilledRun()
    {
        CommitRun(("a.csv", "old"));
        var stale = Directory.CreateDirectory(Path.Combine(Output, ".ratedeck-staging-0badf00d")).FullName;
        File.WriteAllText(Path.Combine(stale, "a.csv"), "half");

        CommitRun(("a.csv", "new"));

        Assert.Equal([StagedOutputFolder.ListName, "a.csv"], Entries());
    }

    [Fact]
    public void EditedListNamingAPathOutsideTheFolder_DeletesNothingOutsideIt()
    {
        CommitRun(("a.csv", "old"));
        var outside = _folder.File("precious.txt");
        File.WriteAllText(outside, "keep");
        File.AppendAllText(Path.Combine(Output, StagedOutputFolder.ListName), "../precious.txt\n..\n");

        CommitRun(("a.csv", "new"));

        Assert.Equal("keep", File.ReadAllText(outside));
    }
}
