namespace RateDeck.Cli;

/// <summary>Entry point of the <c>ratedeck</c> command.</summary>
public static class Program
{
    /// <summary>Runs a verb and returns its documented exit code.</summary>
    public static int Main(string[] args) => Commands.Run(args, Console.Out, Console.Error);
}
