using System.Reflection;

namespace RateDeck.Cli;

/// <summary>The tool's version, as stamped into every output.</summary>
public static class ToolInfo
{
    /// <summary>The informational version of the engine assembly (without the source-revision suffix).</summary>
    public static string Version { get; } =
        (typeof(Decks.Deck).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion ?? "0.0.0")
        .Split('+')[0];
}
