using System.Text;
using RateDeck.Decks;

namespace RateDeck.Fitting.Setup;

/// <summary>
/// Reads the [fit] table of a deck with the positions of every key, so that a mistake is reported
/// at its line and column. The rest of the deck is read by the deck reader as for any verb.
/// </summary>
public static class FitSpecReader
{
    private static readonly string[] _freeKeys = ["start", "lower", "upper", "log"];
    private static readonly string[] _dataKeys = ["csv", "time", "set"];

    /// <summary>Default iteration limit of one Levenberg-Marquardt run.</summary>
    public const int DefaultMaxIterations = 200;

    /// <summary>Reads [fit] from the deck file at <paramref name="path"/> after the <c>--set</c> overrides.</summary>
    /// <exception cref="DeckException">The table is missing or malformed.</exception>
    public static FitSpec Read(string path, IReadOnlyList<string> overrides)
    {
        string text;
        try
        {
            text = File.ReadAllText(path, new UTF8Encoding(false, true));
        }
        catch (Exception e) when (e is IOException or UnauthorizedAccessException)
        {
            throw new DeckException(SourceSpan.None(path), $"cannot read the deck: {e.Message}");
        }

        var (root, _) = TomlTree.ParseDocument(text, path);
        DeckSchema.Check(root);
        Overrides.Apply(root, overrides.Select(DeckOverride.Parse));
        var deckSpan = new SourceSpan(path, 1, 1);
        var fit = new DeckSection("fit", root.Find("fit")?.Value as TomlTableNode, deckSpan);
        if (!fit.Exists)
        {
            throw new DeckException(deckSpan, "the deck has no [fit] table; `ratedeck fit` needs [fit.free] (what to fit), [fit.data.NAME] (the measured series) and, for anything but a state's population, [fit.observables] (docs/fitting.md)");
        }

        var starts = fit.Integer("starts") ?? 1;
        if (starts is < 1 or > 1000)
        {
            throw new DeckException(fit.Entry("starts")!.Value.Span, $"`fit.starts` is {starts}; give 1 (the deck's values only) up to 1000");
        }

        var maxIterations = fit.Integer("max_iterations") ?? DefaultMaxIterations;
        if (maxIterations is < 1 or > 100_000)
        {
            throw new DeckException(fit.Entry("max_iterations")!.Value.Span, $"`fit.max_iterations` is {maxIterations}; give 1 to 100000");
        }

        var seed = fit.Integer("seed") ?? 1;
        var profileLevel = fit.Number("profile_level") ?? FitSpec.DefaultProfileLevel;
        if (!(profileLevel > 0 && profileLevel < 1))
        {
            throw new DeckException(fit.Entry("profile_level")!.Value.Span, $"`fit.profile_level` is {DeckSection.Format(profileLevel)}; give a confidence level between 0 and 1, like 0.95");
        }

        var derivatives = fit.String("derivatives") switch
        {
            null => DerivativeMode.Auto,
            { Value: "auto" } => DerivativeMode.Auto,
            { Value: "differences" } => DerivativeMode.Differences,
            var other => throw new DeckException(other.Span, $"`fit.derivatives` is \"{other.Value}\"; give \"auto\" (analytic sensitivities where they apply, central differences elsewhere) or \"differences\" (central differences throughout)"),
        };
        var triangle = fit.Bool("triangle") ?? false;
        var free = ReadFree(Table(fit, "free"), deckSpan);
        if (free.Count == 0 && !triangle)
        {
            throw new DeckException(fit.Span, "[fit] frees nothing: add [fit.free] with one line per free parameter, like `kT = { log = true }`, or set `triangle = true`");
        }

        var baseDirectory = Path.GetDirectoryName(path) ?? "";
        var data = ReadData(Table(fit, "data"), baseDirectory, fit.Span);
        return new FitSpec(free, ReadObservables(Table(fit, "observables")), data, (int)starts, (int)seed, (int)maxIterations, fit.Bool("profile") ?? false, triangle, derivatives, profileLevel);
    }

    private static DeckSection Table(DeckSection fit, string key)
    {
        var entry = fit.Entry(key);
        if (entry is not null && entry.Value is not TomlTableNode)
        {
            throw new DeckException(entry.Value.Span, $"`fit.{key}` must be a table, written [fit.{key}] on its own line; it is {entry.Value.Describe()}");
        }

        return new DeckSection($"fit.{key}", entry?.Value as TomlTableNode, fit.Span);
    }

    private static List<FreeParameterSpec> ReadFree(DeckSection free, SourceSpan deckSpan)
    {
        var result = new List<FreeParameterSpec>();
        foreach (var entry in free.Entries)
        {
            if (entry.Value is not TomlTableNode table)
            {
                throw new DeckException(entry.Value.Span, $"`fit.free.{entry.Key}` must be an inline table like {{ start = 1.0, lower = 0, log = true }} (or {{}} to start from the deck's value), not {entry.Value.Describe()}");
            }

            var section = new DeckSection($"fit.free.{entry.Key}", table, deckSpan);
            foreach (var item in section.Entries.Where(e => !_freeKeys.Contains(e.Key)))
            {
                throw new DeckException(item.KeySpan, $"unknown key `{item.Key}` for a free parameter; its keys are {string.Join(", ", _freeKeys)}");
            }

            var log = section.Bool("log") ?? false;
            var lower = section.Number("lower") ?? (log ? 0 : double.NegativeInfinity);
            var upper = section.Number("upper") ?? double.PositiveInfinity;
            var start = section.Number("start");
            if (!(lower < upper))
            {
                throw new DeckException(section.Entry("upper")!.Value.Span, $"the upper bound of `{entry.Key}` must be above its lower bound {DeckSection.Format(lower)}");
            }

            if (log && lower < 0)
            {
                throw new DeckException(section.Entry("lower")!.Value.Span, $"`{entry.Key}` is fitted in log (positive values only), so its lower bound cannot be negative; drop `log = true` or give lower >= 0");
            }

            if (start is { } s && (s < lower || s > upper || (log && s <= 0)))
            {
                throw new DeckException(section.Entry("start")!.Value.Span, $"the start of `{entry.Key}` must lie within its bounds{(log ? " and be positive (log = true)" : "")}");
            }

            result.Add(new FreeParameterSpec(entry.Key, start, lower, upper, log, entry.KeySpan));
        }

        return result;
    }

    private static List<ObservableSpec> ReadObservables(DeckSection observables) =>
        observables.Entries.Select(entry => DeckSection.AsString(entry.Value, $"fit.observables.{entry.Key}") is var text
            ? new ObservableSpec(entry.Key, (string)text.Value, text.ContentSpan)
            : null!).ToList();

    private static List<DataSetSpec> ReadData(DeckSection data, string baseDirectory, SourceSpan fitSpan)
    {
        var result = new List<DataSetSpec>();
        foreach (var entry in data.Entries)
        {
            if (entry.Value is not TomlTableNode table)
            {
                throw new DeckException(entry.Value.Span, $"`fit.data.{entry.Key}` must be a table [fit.data.{entry.Key}] with csv = \"file.csv\", not {entry.Value.Describe()}");
            }

            var section = new DeckSection($"fit.data.{entry.Key}", table, entry.KeySpan);
            foreach (var item in section.Entries.Where(e => !_dataKeys.Contains(e.Key)))
            {
                throw new DeckException(item.KeySpan, $"unknown key `{item.Key}` in [fit.data.{entry.Key}]; its keys are {string.Join(", ", _dataKeys)}");
            }

            var csv = (string)section.RequireString("csv", "the data file, a CSV with a time column").Value;
            var time = section.String("time") is { } t ? (string)t.Value : "t";
            var overrides = new List<string>();
            if (section.Array("set") is { } set)
            {
                foreach (var item in set.Items)
                {
                    overrides.Add((string)DeckSection.AsString(item, $"fit.data.{entry.Key}.set").Value);
                }
            }

            result.Add(new DataSetSpec(entry.Key, Path.Combine(baseDirectory, csv), time, overrides, entry.KeySpan));
        }

        return result.Count > 0
            ? result
            : throw new DeckException(fitSpan, "[fit] names no data: add a table [fit.data.NAME] with csv = \"file.csv\" (a time column and one column per observed state or observable)");
    }
}
