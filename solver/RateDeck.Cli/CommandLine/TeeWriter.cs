using System.Text;

namespace RateDeck.Cli.CommandLine;

/// <summary>Writes everything to two writers: a run's diagnostics both on stderr and into its status file.</summary>
internal sealed class TeeWriter(TextWriter first, TextWriter second) : TextWriter
{
    /// <inheritdoc />
    public override Encoding Encoding => first.Encoding;

    /// <inheritdoc />
    public override void Write(char value)
    {
        first.Write(value);
        second.Write(value);
    }

    /// <inheritdoc />
    public override void Write(string? value)
    {
        first.Write(value);
        second.Write(value);
    }

    /// <inheritdoc />
    public override void Flush()
    {
        first.Flush();
        second.Flush();
    }
}
