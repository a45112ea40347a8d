namespace RateDeck.Cli;

/// <summary>Dispatches verbs; the verbs arrive with their issues.</summary>
public static class Commands
{
    /// <summary>Runs the verb named by the first argument.</summary>
    public static int Run(string[] args, TextWriter stdout, TextWriter stderr)
    {
        stderr.WriteLine("usage: ratedeck <check|stiffness|run|steady> DECK [options]");
        return args.Length == 0 ? 2 : 2;
    }
}
