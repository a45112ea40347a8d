using System.Reflection;

namespace RateDeck.Outputs;

/// <summary>The program's name and version as written into every output.</summary>
public static class ToolInfo
{
    /// <summary>The program name, first word of every output header.</summary>
    public const string Name = "ratedeck";

    /// <summary>
    /// The engine assembly's informational version: the <c>Version</c> of Directory.Build.props,
    /// followed by <c>+</c> and the source commit when the build knew it. This is the one place the
    /// version is read from.
    /// </summary>
    public static string Version { get; } =
        typeof(ToolInfo).Assembly.GetCustomAttribute<AssemblyInformationalVersionAttribute>()?.InformationalVersion
        ?? typeof(ToolInfo).Assembly.GetName().Version?.ToString()
        ?? "unknown";
}
