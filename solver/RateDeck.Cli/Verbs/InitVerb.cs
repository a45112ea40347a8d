using System.CommandLine;
using RateDeck.Cli.CommandLine;
using RateDeck.Outputs;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// <c>ratedeck init [FILE]</c>: writes a commented starter deck (a scenario of our own with
/// invented numbers, said to be) that checks clean and runs. An existing file is left alone
/// unless <c>--force</c> is given (exit 5).
/// </summary>
public sealed class InitVerb : IVerb
{
    private const string _defaultFile = "deck.toml";

    // The options of init, declared once here.
    private readonly Argument<string> _file = new("FILE") { Description = "the deck file to write", Arity = ArgumentArity.ZeroOrOne, DefaultValueFactory = _ => _defaultFile };
    private readonly Option<bool> _force = VerbOptions.Switch("--force", "overwrite FILE when it exists");

    /// <summary>Declares the verb and its options.</summary>
    public InitVerb() => Command = new Command("init", "write a commented starter deck to begin from (invented numbers)") { _file, _force };

    /// <inheritdoc />
    public Command Command { get; }

    /// <inheritdoc />
    public int Execute(VerbArguments args, VerbContext context)
    {
        var file = args.Value(_file)!;
        if (file.Length == 0)
        {
            throw new UsageException("FILE is empty: name the deck file to write");
        }

        var force = args.Has(_force);
        if (!force && (File.Exists(file) || Directory.Exists(file)))
        {
            context.Error.WriteLine($"ratedeck init: {file} exists and is left as it is; give --force to overwrite it, or another FILE");
            return ExitCodes.OutputFailed;
        }

        var text = StarterText();
        AtomicFile.Write(file, writer => writer.Write(text), overwrite: force);
        context.Out.WriteLine($"wrote the starter deck {file}; next: ratedeck check {file}, then ratedeck run {file}");
        return ExitCodes.Success;
    }

    /// <summary>The starter deck, kept as a TOML file in the source (Starter/starter-deck.toml).</summary>
    internal static string StarterText()
    {
        using var stream = typeof(InitVerb).Assembly.GetManifestResourceStream("RateDeck.Cli.Starter.starter-deck.toml")
            ?? throw new InvalidOperationException("the starter deck is missing from the program");
        using var reader = new StreamReader(stream);
        return reader.ReadToEnd();
    }
}
