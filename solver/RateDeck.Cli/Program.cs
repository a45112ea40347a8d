using System.Runtime.InteropServices;
using RateDeck.Outputs;

namespace RateDeck.Cli;

/// <summary>Entry point of the <c>ratedeck</c> command.</summary>
public static class Program
{
    /// <summary>The environment variable that, set to 1, lists on stderr each assembly as the run loads it.</summary>
    public const string TraceAssembliesVariable = "RATEDECK_TRACE_ASSEMBLIES";

    /// <summary>Runs a verb and returns its documented exit code.</summary>
    public static int Main(string[] args)
    {
        // Shows what a verb pulls in at start-up: plotting and CSV libraries load only for a verb
        // and deck that use them (docs/performance.md, "Start-up").
        if (Environment.GetEnvironmentVariable(TraceAssembliesVariable) == "1")
        {
            AppDomain.CurrentDomain.AssemblyLoad += (_, loaded) => Console.Error.WriteLine($"ratedeck: loaded {loaded.LoadedAssembly.GetName().Name}");
        }

        // A run stopped by Ctrl-C or a scheduler's SIGTERM removes its temporary files and staging
        // folder and exits with the shell's code for the signal (docs/cli.md).
        using var interrupt = PosixSignalRegistration.Create(PosixSignal.SIGINT, context => Stop(context, ExitCodes.Interrupted));
        using var terminate = PosixSignalRegistration.Create(PosixSignal.SIGTERM, context => Stop(context, ExitCodes.Terminated));
        var code = Commands.Run(args, Console.Out, Console.Error);
        TemporaryPaths.WaitForStop();
        return code;
    }

    private static void Stop(PosixSignalContext context, int exitCode)
    {
        context.Cancel = true;
        Console.Error.WriteLine($"ratedeck: stopped by {context.Signal}; temporary files removed");
        TemporaryPaths.RemoveAllAndExit(exitCode);
    }
}
