namespace RateDeck.Cli.CommandLine;

/// <summary>The explicit step asked for with <c>--dt</c>: a positive number, or <c>auto</c> (<see cref="Fixed"/> null).</summary>
/// <param name="Fixed">The step, or null for the automatic step chosen for accuracy.</param>
public sealed record StepRequest(double? Fixed)
{
    /// <summary>Reads <c>auto</c> or a positive finite number; anything else is a usage error.</summary>
    public static StepRequest Parse(string text) =>
        new(text == "auto" ? null : VerbOptions.ParsePositive("--dt", text));
}
