using System.Diagnostics;
using System.Text;
using RateDeck.Cli;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// Runs the <c>ratedeck</c> command and captures what it prints: in process by default, or, when
/// <see cref="ProgramVariable"/> names a built program, as that program in a child process. The
/// second is the pass of tests/run-tests.sh over the native-compiled program that users run, for the
/// tests marked <c>[Trait("Through", "program")]</c>: those that run the program through this class.
/// </summary>
internal static class CliRunner
{
    /// <summary>The environment variable that names the program to run instead of the verbs in process.</summary>
    public const string ProgramVariable = "RATEDECK_TEST_PROGRAM";

    public static (int ExitCode, string Out, string Error) Run(params string[] args)
    {
        if (Environment.GetEnvironmentVariable(ProgramVariable) is { Length: > 0 })
        {
            return RunProgram(args);
        }

        using var stdout = new StringWriter();
        using var stderr = new StringWriter();
        var code = Commands.Run(args, stdout, stderr);
        return (code, stdout.ToString(), stderr.ToString());
    }

    /// <summary>
    /// How to start the program as a process with <paramref name="args"/>, output redirected: the
    /// program named by <see cref="ProgramVariable"/>, or the build beside the test assembly.
    /// </summary>
    public static ProcessStartInfo StartInfo(params string[] args)
    {
        var program = Environment.GetEnvironmentVariable(ProgramVariable);
        var info = program is { Length: > 0 } ? new ProcessStartInfo(program) : new ProcessStartInfo("dotnet") { ArgumentList = { Path.Combine(AppContext.BaseDirectory, "ratedeck.dll") } };
        info.RedirectStandardOutput = true;
        info.RedirectStandardError = true;
        info.StandardOutputEncoding = Encoding.UTF8;
        info.StandardErrorEncoding = Encoding.UTF8;
        foreach (var arg in args)
        {
            info.ArgumentList.Add(arg);
        }

        return info;
    }

    /// <summary>The program as a POSIX shell command word or words, for scripts that run it.</summary>
    public static string ShellCommand() =>
        Environment.GetEnvironmentVariable(ProgramVariable) is { Length: > 0 } program
            ? $"'{program}'"
            : $"dotnet '{Path.Combine(AppContext.BaseDirectory, "ratedeck.dll")}'";

    private static (int ExitCode, string Out, string Error) RunProgram(string[] args)
    {
        using var process = Process.Start(StartInfo(args))!;
        // Both streams are read while the program runs, so that it never blocks on a full pipe.
        var stdout = process.StandardOutput.ReadToEndAsync();
        var stderr = process.StandardError.ReadToEndAsync();
        process.WaitForExit();
        return (process.ExitCode, stdout.GetAwaiter().GetResult(), stderr.GetAwaiter().GetResult());
    }

    /// <summary>The demo deck copied beside the test assembly.</summary>
    public static string DemoDeck(string name) => Path.Combine(AppContext.BaseDirectory, "decks", name);

    /// <summary>The checkout the tests were built from: the first folder above the test assembly holding RateDeck.sln.</summary>
    public static string RepositoryRoot()
    {
        for (var folder = new DirectoryInfo(AppContext.BaseDirectory); folder is not null; folder = folder.Parent)
        {
            if (File.Exists(Path.Combine(folder.FullName, "RateDeck.sln")))
            {
                return folder.FullName;
            }
        }

        throw new InvalidOperationException($"no RateDeck.sln above {AppContext.BaseDirectory}");
    }

    /// <summary>The verbs as the parser declares them, for theories over every verb.</summary>
    public static TheoryData<string> Verbs() => [.. Commands.Declaration().Subcommands.Select(c => c.Name)];
}
