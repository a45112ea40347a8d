using System.Text;
using RateDeck.Outputs;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Outputs;

public sealed class AtomicFileTests
{
    [Fact]
    public void WriterThrowingMidway_LeavesNoFileAndNoTemporary()
    {
        using var folder = new TempFolder();
        var target = folder.File("trajectory.csv");

        var error = Assert.Throws<InvalidOperationException>(() => AtomicFile.Write(target, writer =>
        {
            writer.WriteLine("time,a");
            writer.Flush();
            throw new InvalidOperationException("disk full (simulated)");
        }));

        Assert.Equal("disk full (simulated)", error.Message);
        Assert.Empty(folder.Entries());
    }

    [Fact]
    public void WriterThrowing_KeepsExistingFileUntouched()
    {
        using var folder = new TempFolder();
        var target = folder.File("plot.png");
        File.WriteAllBytes(target, [1, 2, 3]);

        Assert.Throws<IOException>(() => AtomicFile.WriteBytes(target, stream =>
        {
            stream.Write(new byte[1000]);
            throw new IOException("cut off");
        }));

        Assert.Equal([1, 2, 3], File.ReadAllBytes(target));
        Assert.Equal(["plot.png"], folder.Entries());
    }

    [Fact]
    public void SuccessfulWrite_ReplacesExistingFile_WithUtf8WithoutBomAndLfLineEnds()
    {
        using var folder = new TempFolder();
        var target = folder.File("summary.txt");
        File.WriteAllText(target, "old content that is longer than the new one");

        AtomicFile.Write(target, writer =>
        {
            writer.WriteLine("λ = 2");
            writer.WriteLine("done");
        });

        Assert.Equal(Encoding.UTF8.GetBytes("λ = 2\ndone\n"), File.ReadAllBytes(target));
        Assert.Equal(["summary.txt"], folder.Entries());
    }

    [Fact]
    public void MissingFolder_ThrowsAndCreatesNothing()
    {
        using var folder = new TempFolder();
        var target = Path.Combine(folder.Path, "absent", "x.csv");

        Assert.Throws<DirectoryNotFoundException>(() => AtomicFile.Write(target, writer => writer.Write("x")));

        Assert.Empty(folder.Entries());
    }
}
