using System.Diagnostics;
using System.Globalization;
using System.Security.Cryptography;
using RateDeck.Cli;
using RateDeck.Tests.Support;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// A run stopped by SIGTERM or SIGINT while it writes its outputs exits with the documented code
/// (143, 130; docs/cli.md), leaves no temporary file or staging folder, and leaves the output
/// folder exactly as the earlier run left it, or absent when the stopped run created it (issue 9
/// §8). Runs the real program as a child process, since only a process can be sent a signal.
/// </summary>
public sealed class InterruptedRunTests : IDisposable
{
    private readonly TempFolder _folder = new();

    public void Dispose() => _folder.Dispose();

    [Trait("Through", "program")]
    [Theory]
    [InlineData("TERM", ExitCodes.Terminated)]
    [InlineData("INT", ExitCodes.Interrupted)]
    public async Task RunStoppedWhileWriting_LeavesTheEarlierOutputsWholeAndNoTemporaryFile(string signal, int expectedCode)
    {
        var output = _folder.File("out");
        var (code, _, error) = CliRunner.Run("run", WriteDeck("small.toml", outputs: 5), "--no-plots", "--out", output);
        Assert.True(code == ExitCodes.Success, error);
        var before = Snapshot(output);
        var entriesBefore = _folder.Entries();

        var stopped = await RunAndStopWhileWritingAsync(signal, output);

        Assert.True(stopped.Code == expectedCode, $"exit {stopped.Code}, stderr: {stopped.Error}");
        Assert.Equal(before, Snapshot(output));
        Assert.Equal(entriesBefore.Append("large.toml").Order(StringComparer.Ordinal), _folder.Entries().Order(StringComparer.Ordinal));
    }

    [Trait("Through", "program")]
    [Fact]
    public async Task RunStoppedWhileWritingIntoANewFolder_LeavesNoFolder()
    {
        var output = _folder.File("fresh");

        var stopped = await RunAndStopWhileWritingAsync("TERM", output);

        Assert.True(stopped.Code == ExitCodes.Terminated, $"exit {stopped.Code}, stderr: {stopped.Error}");
        Assert.Equal(["large.toml"], _folder.Entries());
    }

    /// <summary>
    /// Starts a run whose populations file is large (200,001 output times: over 100 MB, seconds to
    /// write), sends the signal as soon as the staging folder holds a file, and returns the exit code.
    /// </summary>
    private async Task<(int Code, string Error)> RunAndStopWhileWritingAsync(string signal, string output)
    {
        var deck = WriteDeck("large.toml", outputs: 200_000);
        var info = CliRunner.StartInfo("run", deck, "--exact-only", "--no-plots", "--out", output);
        using var process = Process.Start(info)!;
        try
        {
            // Read both streams while waiting, so that the child never blocks on a full pipe.
            var stdout = process.StandardOutput.ReadToEndAsync();
            var stderr = process.StandardError.ReadToEndAsync();
            if (!StagedFileAppears(process, output))
            {
                process.WaitForExit(60_000);
                Assert.Fail($"the run ended or stalled before it staged a file (exited: {process.HasExited}, stderr: {(process.HasExited ? await stderr : "")})");
            }
            using (var kill = Process.Start("kill", ["-" + signal, process.Id.ToString(CultureInfo.InvariantCulture)]))
            {
                await kill.WaitForExitAsync();
            }

            await process.WaitForExitAsync().WaitAsync(TimeSpan.FromSeconds(60));
            await stdout;
            return (process.ExitCode, await stderr);
        }
        finally
        {
            if (!process.HasExited)
            {
                process.Kill();
            }
        }
    }

    /// <summary>
    /// Polls on the test's own thread, not by awaited delays: during the full suite the thread pool
    /// is busy with other tests, and a delayed continuation can miss the seconds of writing.
    /// </summary>
    private static bool StagedFileAppears(Process process, string output)
    {
        var deadline = Stopwatch.StartNew();
        while (!process.HasExited && deadline.Elapsed < TimeSpan.FromSeconds(60))
        {
            try
            {
                if (Directory.Exists(output) && Directory.EnumerateDirectories(output, ".ratedeck-staging-*").Any(d => Directory.EnumerateFiles(d).Any()))
                {
                    return true;
                }
            }
            catch (DirectoryNotFoundException)
            {
                // A stale staging folder removed between the two listings; look again.
            }

            Thread.Sleep(2);
        }

        return false;
    }

    private string WriteDeck(string name, int outputs)
    {
        var path = _folder.File(name);
        File.WriteAllText(path, "format = 1\ntitle = \"interrupted\"\n[units]\nenergy = \"eV\"\n[temperature]\nkT = 0.05\n"
            + "[states]\nspacing = \"linear\"\ncount = 30\nfrom = 0.0\nto = 0.29\n[energies]\nexpression = \"x\"\n"
            + "[transfer]\nkind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"exp(-(x - y) / 0.02)\"\n"
            + $"[initial]\nstate = 30\n[run]\nt_end = 10\noutputs = {outputs}\n");
        return path;
    }

    /// <summary>Every entry of the folder, hidden ones too, with a hash of each file's bytes, in name order.</summary>
    private static string[] Snapshot(string folder) => Directory.GetFileSystemEntries(folder)
        .Order(StringComparer.Ordinal)
        .Select(e => File.Exists(e) ? $"{Path.GetFileName(e)} {Convert.ToHexString(SHA256.HashData(File.ReadAllBytes(e)))}" : $"{Path.GetFileName(e)}/")
        .ToArray();
}
