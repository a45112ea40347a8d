namespace RateDeck.Cli.CommandLine;

/// <summary>A malformed command line; printed as <c>ratedeck: message</c> with exit code 2.</summary>
public sealed class UsageException : Exception
{
    /// <summary>Creates the exception with a message that says what to do.</summary>
    public UsageException(string message) : base(message) { }
}
