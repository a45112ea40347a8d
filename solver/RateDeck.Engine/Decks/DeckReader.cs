using System.Security.Cryptography;
using System.Text;
using System.Text.RegularExpressions;
using RateDeck.Text;

namespace RateDeck.Decks;

/// <summary>
/// Reads a deck (TOML, format 1, described in docs/deck-format.md) into a validated
/// <see cref="Deck"/>. Every problem is a <see cref="DeckException"/> at the one-based line and
/// column of the offending key, value or CSV cell. Expressions are stored as text with the span
/// of their first character; they are compiled by a later stage.
/// </summary>
public static partial class DeckReader
{
    /// <summary>Names an expression may use besides the parameters; a parameter may not take them.</summary>
    private static readonly string[] _reservedNames = ["x", "y", "i", "j", "kT", "q", "v"];

    /// <summary>
    /// Reads the deck file at <paramref name="path"/>, applies <paramref name="overrides"/>
    /// (<c>key=value</c> each) and validates it. Relative CSV paths resolve against the deck's folder.
    /// </summary>
    /// <exception cref="DeckException">The file is missing or unreadable (span <c>SourceSpan.None(path)</c>), or the deck is invalid.</exception>
    public static Deck Read(string path, IReadOnlyList<string> overrides)
    {
        var bytes = InputFile.ReadAllBytes(path, reason => new DeckException(SourceSpan.None(path), $"cannot read the deck: {reason}"));
        var text = InputFile.DecodeText(bytes, path);
        return Parse(text, Sha256(bytes), path, Path.GetDirectoryName(path) ?? "", overrides);
    }

    /// <summary>
    /// Reads a deck from <paramref name="text"/> as if it were the file <paramref name="path"/>
    /// in <paramref name="baseDirectory"/> (where relative CSV paths resolve).
    /// <see cref="Deck.Sha256"/> is the hash of the text's UTF-8 bytes.
    /// </summary>
    /// <exception cref="DeckException">The deck is invalid.</exception>
    public static Deck Parse(string text, string path, string baseDirectory, IReadOnlyList<string> overrides)
        => Parse(text, Sha256(Encoding.UTF8.GetBytes(text)), path, baseDirectory, overrides);

    private static Deck Parse(string text, string sha256, string path, string baseDirectory, IReadOnlyList<string> overrides)
    {
        var (root, syntax) = TomlTree.ParseDocument(text, path);
        DeckSchema.Check(root);
        var source = new DeckSource(root, syntax, path, baseDirectory, sha256);
        return Derive(source, overrides.Select(DeckOverride.Parse).ToArray(), new DeckMemo());
    }

    /// <summary>
    /// The deck of <paramref name="source"/> with <paramref name="overrides"/> applied in order,
    /// validated; the source's tree is left as it was. <paramref name="memo"/> carries what the
    /// stages may reuse (rate files read, expressions compiled) to the new deck.
    /// </summary>
    internal static Deck Derive(DeckSource source, IReadOnlyList<DeckOverride> overrides, DeckMemo memo)
    {
        var root = overrides.Count == 0 ? source.Root : source.Root.DeepCopy();
        Overrides.Apply(root, overrides);
        return new Builder(root, source.Path, source.BaseDirectory, memo).Build(source.Sha256, overrides) with
        {
            Source = source,
            Memo = memo,
        };
    }

    private static string Sha256(byte[] bytes) => Convert.ToHexStringLower(SHA256.HashData(bytes));

    private sealed record RateFileKey(string FullPath, string Labels, RateCsvReader.Rules Rules);

    private sealed record InitialFileKey(string FullPath, string Labels);

    [GeneratedRegex("^[A-Za-z_][A-Za-z0-9_]*$")]
    private static partial Regex IdentifierPattern();

    /// <summary>Reads the tables of one deck in dependency order (the states before anything per state).</summary>
    private sealed class Builder(TomlTableNode root, string path, string baseDirectory, DeckMemo memo)
    {
        // What the deck lacks is reported at its first line and column, so every error is located.
        private readonly SourceSpan _deckSpan = root.Span;
        private GridSpec _grid = null!;
        private StateNames _states = null!;
        private (string Given, string Output) _time = ("s", "s");

        public Deck Build(string sha256, IReadOnlyList<DeckOverride> overrides)
        {
            var top = new DeckSection("", root, _deckSpan);
            var format = ReadFormat(top);
            var title = top.String("title") is { } t ? (string)t.Value : Path.GetFileNameWithoutExtension(path);
            var units = Section("units");
            var energyUnit = ReadEnergyUnit(units);
            _time = ReadTimeUnits(units);
            var (kT, kTSpan) = ReadTemperature(Section("temperature"), energyUnit);
            var parameters = ReadParameters(Section("parameters"));
            _grid = GridReader.Read(Section("states"));
            _states = new StateNames(_grid.Labels);
            var mechanics = ReadMechanics(Section("mechanics"), energyUnit, _time.Given);
            var energies = ReadEnergies(Section("energies"));
            var weightsSection = Section("weights");
            var weights = ReadWeights(weightsSection, mechanics);
            var coupling = ReadTransfer(Section("transfer"));
            var given = (energies is null ? EquilibriumGiven.None : EquilibriumGiven.Energies)
                | (weightsSection.Exists ? EquilibriumGiven.Weights : EquilibriumGiven.None);

            // Completion needs pi; a full measured matrix has its own stationary law and needs none.
            if (energies is null && coupling is not MeasuredFull)
            {
                throw NoChoice(Section("energies"), "values = [...] (one energy per state) or expression = \"...\" (only a full measured matrix, kind = \"full\", may leave energies out)");
            }

            return new Deck
            {
                SourcePath = path,
                Sha256 = sha256,
                Title = title,
                FormatVersion = format,
                EnergyUnit = energyUnit,
                TimeUnit = _time.Output,
                GivenTimeUnit = _time.Given == _time.Output ? null : _time.Given,
                RateConversion = _time.Given == _time.Output ? RateConversion.None : TimeUnits.RateFactor(_time.Given, _time.Output),
                KT = kT,
                KTSpan = kTSpan,
                Grid = _grid,
                Energies = energies ?? new PerStateValues(new double[_grid.Count], _deckSpan),
                Weights = weights,
                EquilibriumGiven = given,
                Coupling = coupling,
                Losses = ReadRates(Section("losses")),
                Pumping = ReadRates(Section("pumping")),
                Initial = ReadInitial(Section("initial")),
                Run = ReadRun(Section("run")),
                Mechanics = mechanics,
                Plot = ReadPlot(Section("states"), Section("plot")),
                Parameters = parameters,
                Overrides = overrides.Select(o => o.ToString()).ToArray(),
                AppliedOverrides = overrides.ToArray(),
            };
        }

        private DeckSection Section(string name) => new(name, root.Find(name)?.Value as TomlTableNode, _deckSpan);

        private int ReadFormat(DeckSection top)
        {
            var node = top.Entry("format")?.Value ?? throw new DeckException(_deckSpan, "the deck must start with `format = 1` (the deck format version)");
            var format = DeckSection.AsInteger(node, "format");
            return format == 1 ? 1 : throw new DeckException(node.Span, $"this RateDeck reads deck format 1, not {format}");
        }

        private static EnergyUnit ReadEnergyUnit(DeckSection units)
        {
            var scalar = units.String("energy");
            if (scalar is null)
            {
                return EnergyUnit.Dimensionless;
            }

            var name = (string)scalar.Value;
            return EnergyUnits.TryParse(name, out var unit)
                ? unit
                : throw new DeckException(scalar.ContentSpan, $"unknown energy unit \"{name}\".{Suggestions.Hint(name, EnergyUnits.Names)} Choose one of {string.Join(", ", EnergyUnits.Names.Select(n => $"\"{n}\""))}.");
        }

        /// <summary>
        /// The unit the deck's rates and times are given in (<c>time</c>, a known unit, default s; or
        /// <c>model_time</c>, a name without conversion) and the unit outputs are written in
        /// (<c>output_time</c>, default the given one).
        /// </summary>
        private static (string Given, string Output) ReadTimeUnits(DeckSection units)
        {
            if (units.Choice(DeckSchema.Alternatives["units"]) == "model_time")
            {
                var scalar = units.String("model_time")!;
                var name = ((string)scalar.Value).Trim();
                if (name.Length == 0 || name.Any(char.IsControl))
                {
                    throw new DeckException(scalar.ContentSpan, "`units.model_time` must be a short name on one line, like \"t0\"");
                }

                if (TimeUnits.IsKnown(name))
                {
                    throw new DeckException(scalar.ContentSpan, $"\"{name}\" is a time unit RateDeck converts; write time = \"{name}\" instead of model_time");
                }

                units.Forbid("output_time", $"a model time unit (\"{name}\") has no conversion to other units; to write outputs in another unit, give the rates' unit as time = one of {KnownTimeUnits}");
                return (name, name);
            }

            var given = units.String("time") is { } time ? KnownTimeUnit(time, "time") : "s";
            var output = units.String("output_time") is { } written ? KnownTimeUnit(written, "output_time") : given;
            return (given, output);
        }

        private static string KnownTimeUnits => string.Join(", ", TimeUnits.Names.Select(n => $"\"{n}\""));

        private static string KnownTimeUnit(TomlScalar scalar, string key)
        {
            var name = (string)scalar.Value;
            if (TimeUnits.IsKnown(name))
            {
                return name;
            }

            var model = key == "time" ? $"; for a model unit without conversion write model_time = \"{name.Trim()}\" instead" : "";
            throw new DeckException(scalar.ContentSpan, $"unknown time unit \"{name}\" in `units.{key}`.{Suggestions.Hint(name, TimeUnits.Names)} Known units: {KnownTimeUnits}{model}.");
        }

        /// <summary>states.coordinate_name and states.coordinate_unit (labels on one line), [plot] axis scales.</summary>
        private static PlotSpec ReadPlot(DeckSection states, DeckSection plot)
        {
            static GridSpacing? Axis(DeckSection plot, string key) => plot.Word(key, ["auto", "linear", "log"]) switch
            {
                "linear" => GridSpacing.Linear,
                "log" => GridSpacing.Logarithmic,
                _ => null,
            };

            return new PlotSpec(PlotLabel(states, "coordinate_name", "\"wave number k\""), PlotLabel(states, "coordinate_unit", "\"1/nm\""),
                Axis(plot, "time_axis"), Axis(plot, "state_axis"));
        }

        private static string? PlotLabel(DeckSection section, string key, string example)
        {
            if (section.String(key) is not { } scalar)
            {
                return null;
            }

            var label = ((string)scalar.Value).Trim();
            return label.Length > 0 && !label.Any(char.IsControl)
                ? label
                : throw new DeckException(scalar.ContentSpan, $"`{section.Qualified(key)}` is a label for the plots' axes and must be a short text on one line, like {example}");
        }

        private static (double KT, SourceSpan Span) ReadTemperature(DeckSection temperature, EnergyUnit unit)
        {
            var choice = temperature.Choice(DeckSchema.Alternatives["temperature"]);
            if (choice is null)
            {
                var where = temperature.Exists ? "[temperature] needs" : "the deck needs a [temperature] table with";
                throw new DeckException(temperature.Span, $"{where} kT (in the energy unit) or kelvin");
            }

            var node = temperature.Entry(choice)!.Value;
            var value = Positive(node, temperature.Qualified(choice));
            if (choice == "kT")
            {
                return (value, node.Span);
            }

            if (unit == EnergyUnit.Dimensionless)
            {
                throw new DeckException(node.Span, "a temperature in kelvin needs a physical energy unit: set [units] energy = \"K\" (or eV, cm-1, J, kJ/mol), or give kT in model units");
            }

            return (EnergyUnits.KTFromKelvin(value, unit), node.Span);
        }

        private static Dictionary<string, DeckParameter> ReadParameters(DeckSection parameters)
        {
            var result = new Dictionary<string, DeckParameter>(StringComparer.Ordinal);
            foreach (var entry in parameters.Entries)
            {
                if (!IdentifierPattern().IsMatch(entry.Key))
                {
                    throw new DeckException(entry.KeySpan, $"a parameter name must be letters, digits and underscores, starting with a letter: `{entry.Key}`");
                }

                if (_reservedNames.Contains(entry.Key))
                {
                    throw new DeckException(entry.KeySpan, $"`{entry.Key}` is a variable of the expressions ({string.Join(", ", _reservedNames)}); give the parameter another name");
                }

                if (Expressions.ExpressionCompiler.IsReservedName(entry.Key))
                {
                    throw new DeckException(entry.KeySpan, $"`{entry.Key}` is a function or constant of the expressions; give the parameter another name");
                }

                var value = DeckSection.AsNumber(entry.Value, parameters.Qualified(entry.Key));
                result[entry.Key] = new DeckParameter(entry.Key, value, entry.Value.Span);
            }

            return result;
        }

        /// <summary>The energies, or null when the deck has no [energies] table.</summary>
        private PerStateSource? ReadEnergies(DeckSection energies)
        {
            var choice = energies.Choice(DeckSchema.Alternatives["energies"]);
            return choice switch
            {
                "values" => Values(energies, "values", (_, _) => { }),
                "expression" => Expression(energies, "expression"),
                _ when !energies.Exists => null,
                _ => throw NoChoice(energies, "values = [...] (one energy per state) or expression = \"...\""),
            };
        }

        private WeightSpec ReadWeights(DeckSection weights, MechanicsSpec? mechanics)
        {
            var choice = weights.Choice(DeckSchema.Alternatives["weights"]);
            switch (choice)
            {
                case "values":
                    return new GivenWeights(Values(weights, "values", (value, node) =>
                    {
                        if (value <= 0)
                        {
                            throw new DeckException(node.Span, $"a weight must be > 0, not {DeckSection.Format(value)}");
                        }
                    }));
                case "expression":
                    return new GivenWeights(Expression(weights, "expression"));
                case "isotropic_dimension":
                    return Isotropic(weights);
                case "from_mechanics":
                    var node = weights.Entry(choice)!.Value;
                    if (!DeckSection.AsBool(node, "weights.from_mechanics"))
                    {
                        throw new DeckException(node.Span, "`weights.from_mechanics = false` chooses nothing; remove it or give values, expression or isotropic_dimension");
                    }

                    return mechanics is null
                        ? throw new DeckException(node.Span, "weights from mechanics need a [mechanics] table with a lagrangian")
                        : new MechanicsWeights(node.Span);
                default:
                    // No [weights]: every state counts once, the common choice for plain levels.
                    if (weights.Exists)
                    {
                        throw NoChoice(weights, "values, expression, isotropic_dimension or from_mechanics = true");
                    }

                    return new GivenWeights(new PerStateValues(Enumerable.Repeat(1.0, _grid.Count).ToArray(), _deckSpan));
            }
        }

        private IsotropicWeights Isotropic(DeckSection weights)
        {
            var node = weights.Entry("isotropic_dimension")!.Value;
            var dimension = DeckSection.AsInteger(node, "weights.isotropic_dimension");
            if (dimension < 1 || dimension > 1000)
            {
                throw new DeckException(node.Span, $"`weights.isotropic_dimension` must be between 1 and 1000, not {dimension}");
            }

            var first = Array.FindIndex(_grid.Coordinates, x => x <= 0);
            if (first >= 0)
            {
                throw new DeckException(node.Span, $"an isotropic measure needs coordinates > 0 (radii in wave-number space); state {_grid.Labels[first]} has x = {DeckSection.Format(_grid.Coordinates[first])}");
            }

            return new IsotropicWeights((int)dimension, node.Span);
        }

        private CouplingSpec ReadTransfer(DeckSection transfer)
        {
            var kind = transfer.Word("kind", ["one_way", "full", "kernel"])
                ?? throw transfer.Missing("kind", "\"one_way\", \"full\" or \"kernel\"");
            switch (kind)
            {
                case "one_way":
                    transfer.Forbid("kernel", "kind = \"one_way\" reads measured rates from `csv`");
                    transfer.Forbid("band", "`band` applies to kind = \"kernel\" only");
                    var direction = ReadDirection(transfer);
                    var (entries, span) = ReadCsv(transfer, new RateCsvReader.Rules(direction));
                    return new MeasuredOneWay(direction, entries, span);
                case "full":
                    transfer.Forbid("kernel", "kind = \"full\" reads measured rates from `csv`");
                    transfer.Forbid("band", "`band` applies to kind = \"kernel\" only");
                    transfer.Forbid("direction", "a full matrix gives both directions; detailed balance is checked, not imposed");
                    var (all, fullSpan) = ReadCsv(transfer, new RateCsvReader.Rules(null));
                    return new MeasuredFull(all, fullSpan);
                default:
                    transfer.Forbid("csv", "kind = \"kernel\" computes the rates from `kernel`");
                    var text = transfer.RequireString("kernel", "the expression W(x -> y)");
                    var kernelDirection = ReadDirection(transfer);
                    int? band = null;
                    if (transfer.Entry("band") is { } bandEntry)
                    {
                        var b = DeckSection.AsInteger(bandEntry.Value, "transfer.band");
                        band = b >= 1 && b < int.MaxValue
                            ? (int)b
                            : throw new DeckException(bandEntry.Value.Span, $"`transfer.band` must be at least 1 (1 keeps nearest neighbours), not {b}");
                    }

                    return new KernelModel((string)text.Value, kernelDirection, band, text.ContentSpan);
            }
        }

        private static TransferDirection ReadDirection(DeckSection transfer)
            => transfer.Word("direction", ["toward_smaller", "toward_larger"]) switch
            {
                "toward_smaller" => TransferDirection.TowardSmaller,
                "toward_larger" => TransferDirection.TowardLarger,
                _ => throw transfer.Missing("direction", "\"toward_smaller\" or \"toward_larger\", the direction of the given rates"),
            };

        private (IReadOnlyList<RateEntry> Entries, SourceSpan Span) ReadCsv(DeckSection transfer, RateCsvReader.Rules rules)
        {
            var (display, fullPath, span) = CsvPath(transfer, "the file of measured rates, columns from,to,rate", "rate file", "rates.csv");

            // A deck derived by overrides reads the file once: the rows depend only on the file,
            // the state labels (which resolve its cells) and the declared direction.
            var entries = memo.GetOrAdd(
                new RateFileKey(fullPath, string.Join('\n', _grid.Labels), rules),
                () => RateCsvReader.Read(display, fullPath, span, _states, rules));
            return (entries, span);
        }

        /// <summary>The file named by <c>csv</c> in <paramref name="section"/>: as shown (relative to the deck's folder), its full path, and the span of the value.</summary>
        private (string Display, string FullPath, SourceSpan Span) CsvPath(DeckSection section, string what, string noun, string example)
        {
            var csv = section.RequireString("csv", what);
            var given = (string)csv.Value;
            if (given.Trim().Length == 0)
            {
                throw new DeckException(csv.ContentSpan, $"`{section.Qualified("csv")}` is empty; name the {noun}, like \"{example}\"");
            }

            if (given.Contains('\0', StringComparison.Ordinal))
            {
                throw new DeckException(csv.ContentSpan, $"`{section.Qualified("csv")}` contains a NUL character (\\u0000); write the file name without it");
            }

            var display = Path.IsPathRooted(given) ? given : Path.Combine(baseDirectory, given);
            return (display, Path.GetFullPath(display), csv.ContentSpan);
        }

        /// <summary>[initial] csv: populations per state from a file, read once for every deck derived from this one.</summary>
        private InitialGiven ReadInitialCsv(DeckSection initial)
        {
            var (display, fullPath, span) = CsvPath(initial, "the file of initial populations, columns state,population", "initial population file", "initial.csv");
            var populations = memo.GetOrAdd(
                new InitialFileKey(fullPath, string.Join('\n', _grid.Labels)),
                () => InitialCsvReader.Read(display, fullPath, span, _states));
            return new InitialGiven(new PerStateValues((double[])populations.Clone(), span));
        }

        /// <summary>[losses] or [pumping]: optional, per time unit, never negative.</summary>
        private PerStateSource? ReadRates(DeckSection section)
        {
            if (!section.Exists)
            {
                return null;
            }

            var choice = section.Choice(DeckSchema.Alternatives[section.Name]);
            return choice switch
            {
                "values" => Values(section, "values", (value, node) => NonNegative(value, node, section.Qualified("values"))),
                "expression" => Expression(section, "expression"),
                "by_state" => ByState(section),
                _ => throw NoChoice(section, "values = [...], expression = \"...\" or by_state = { label = rate }"),
            };
        }

        private PerStateValues ByState(DeckSection section)
        {
            var node = section.Entry("by_state")!.Value;
            if (node is not TomlTableNode table)
            {
                throw new DeckException(node.Span, $"`{section.Qualified("by_state")}` must be a table of state = rate, like {{ {_grid.Labels[0]} = 0.5 }}, not {node.Describe()}");
            }

            var values = new double[_grid.Count];
            foreach (var entry in table.Entries)
            {
                if (entry.Value is TomlTableNode)
                {
                    throw new DeckException(entry.KeySpan, $"`{entry.Key}` is not a state label (a dotted key makes a table); quote a label that contains dots, like \"{entry.Key}\" = 1.0");
                }

                var state = _states.Resolve(entry.Key, entry.KeySpan);
                var value = DeckSection.AsNumber(entry.Value, $"{section.Qualified("by_state")}.{entry.Key}");
                NonNegative(value, entry.Value, section.Qualified("by_state"));
                values[state] = value;
            }

            return new PerStateValues(values, node.Span);
        }

        private InitialSpec ReadInitial(DeckSection initial)
        {
            var choice = initial.Choice(DeckSchema.Alternatives["initial"]);
            switch (choice)
            {
                case "state":
                    var node = initial.Entry("state")!.Value;
                    var span = node is TomlScalar s ? s.ContentSpan : node.Span;
                    return new InitialInState(_states.Resolve(node, "initial.state"), span);
                case "values":
                    return new InitialGiven(Values(initial, "values", (value, n) => NonNegative(value, n, "initial.values")));
                case "expression":
                    return new InitialGiven(Expression(initial, "expression"));
                case "csv":
                    return ReadInitialCsv(initial);
                case "equilibrium":
                    var flag = initial.Entry("equilibrium")!.Value;
                    return DeckSection.AsBool(flag, "initial.equilibrium")
                        ? new InitialEquilibrium(flag.Span)
                        : throw new DeckException(flag.Span, "`initial.equilibrium = false` chooses nothing; give state, values or expression instead");
                default:
                    return initial.Exists
                        ? throw NoChoice(initial, "state, values, expression, csv or equilibrium = true")
                        : new InitialEquilibrium(_deckSpan);
            }
        }

        private RunSpec ReadRun(DeckSection run)
        {
            var tEndNode = run.Require("t_end", "the end time of the run, > 0");
            var tEnd = Positive(tEndNode, "run.t_end");

            var outputs = 50L;
            if (run.Entry("outputs") is { } outputsEntry)
            {
                outputs = DeckSection.AsInteger(outputsEntry.Value, "run.outputs");
                if (outputs < 1 || outputs > 10_000_000)
                {
                    throw new DeckException(outputsEntry.Value.Span, $"`run.outputs` must be between 1 and 10000000, not {outputs}");
                }
            }

            var spacing = run.Word("spacing", ["linear", "log"]) == "log" ? OutputSpacing.Logarithmic : OutputSpacing.Linear;
            double? tFirst = null;
            if (spacing == OutputSpacing.Logarithmic)
            {
                tFirst = tEnd * 1e-4;
                if (run.Entry("t_first") is { } firstEntry)
                {
                    tFirst = Positive(firstEntry.Value, "run.t_first");
                    if (tFirst >= tEnd)
                    {
                        throw new DeckException(firstEntry.Value.Span, $"`run.t_first` ({DeckSection.Format(tFirst.Value)}) must be smaller than `run.t_end` ({DeckSection.Format(tEnd)})");
                    }
                }
            }
            else
            {
                run.Forbid("t_first", "`t_first` starts a logarithmic output grid; set spacing = \"log\" or remove it");
            }

            var method = run.Word("explicit", ["rk4", "euler"]) == "euler" ? ExplicitMethod.Euler : ExplicitMethod.RungeKutta4;
            var dt = ReadDt(run);
            var safety = 0.5;
            if (run.Entry("safety") is { } safetyEntry)
            {
                safety = DeckSection.AsNumber(safetyEntry.Value, "run.safety");
                if (safety <= 0 || safety > 1)
                {
                    throw new DeckException(safetyEntry.Value.Span, $"`run.safety` is the fraction of the stability limit used by dt = \"auto\" and must be in (0, 1], not {DeckSection.Format(safety)}");
                }
            }

            var accuracy = RunSpec.DefaultAccuracy;
            if (run.Entry("accuracy") is { } accuracyEntry)
            {
                accuracy = DeckSection.AsNumber(accuracyEntry.Value, "run.accuracy");
                if (!(accuracy > 0 && accuracy < 1))
                {
                    throw new DeckException(accuracyEntry.Value.Span, $"`run.accuracy` is the largest explicit-minus-exact difference allowed, as a fraction of the total population, and must be in (0, 1), not {DeckSection.Format(accuracy)}");
                }
            }

            var listed = ReadListedTimes(run, tEnd);
            var plotStates = run.Array("plot_states") is { } plots
                ? plots.Items.Select(item => _states.Resolve(item, "run.plot_states")).ToArray()
                : [];
            // The deck's times are in its given unit; the run and its outputs are in the output unit.
            return new RunSpec(OutputTime(tEnd), (int)outputs, spacing, tFirst is { } first ? OutputTime(first) : null, method, dt is { } step ? OutputTime(step) : null, safety, plotStates, run.Span)
            {
                Accuracy = accuracy,
                ListedTimes = listed?.Select(OutputTime).ToArray(),
            };
        }

        /// <summary>A time of the deck (in its given unit) in the output unit.</summary>
        private double OutputTime(double time) => _time.Given == _time.Output ? time : TimeUnits.ConvertTime(time, _time.Given, _time.Output);

        /// <summary>run.times: measurement times, strictly ascending in (0, t_end]; not with a grid's keys.</summary>
        private static double[]? ReadListedTimes(DeckSection run, double tEnd)
        {
            if (run.Array("times") is not { } array)
            {
                return null;
            }

            foreach (var gridKey in new[] { "outputs", "spacing", "t_first" })
            {
                run.Forbid(gridKey, "`run.times` lists the output times; leave out the grid's outputs, spacing and t_first");
            }

            if (array.Items.Count == 0)
            {
                throw new DeckException(array.Span, "`run.times` is empty; list at least one output time, like [1e-6, 5e-6]");
            }

            var times = new double[array.Items.Count];
            for (var k = 0; k < times.Length; k++)
            {
                var node = array.Items[k];
                times[k] = Positive(node, "run.times");
                if (times[k] > tEnd)
                {
                    throw new DeckException(node.Span, $"output time {DeckSection.Format(times[k])} is after `run.t_end` ({DeckSection.Format(tEnd)})");
                }

                if (k > 0 && times[k] <= times[k - 1])
                {
                    throw new DeckException(node.Span, $"`run.times` must be strictly ascending: {DeckSection.Format(times[k])} follows {DeckSection.Format(times[k - 1])}");
                }
            }

            return times;
        }

        private static double? ReadDt(DeckSection run)
        {
            if (run.Entry("dt")?.Value is not { } node)
            {
                return null;
            }

            if (node is TomlScalar { Value: string word } scalar)
            {
                return word == "auto"
                    ? null
                    : throw new DeckException(scalar.ContentSpan, $"`run.dt` is a number > 0 or \"auto\", not \"{word}\"");
            }

            return Positive(node, "run.dt");
        }

        private static MechanicsSpec? ReadMechanics(DeckSection mechanics, EnergyUnit unit, string timeUnit)
        {
            if (!mechanics.Exists)
            {
                return null;
            }

            var lagrangian = mechanics.RequireString("lagrangian", "L(q, v) as an expression");
            double planck;
            if (mechanics.Entry("planck") is { } planckEntry)
            {
                planck = Positive(planckEntry.Value, "mechanics.planck");
            }
            else if (unit == EnergyUnit.Dimensionless)
            {
                planck = 1.0;
            }
            else if (timeUnit == "s")
            {
                planck = EnergyUnits.PlanckIn(unit);
            }
            else
            {
                throw mechanics.Missing("planck", $"h in {EnergyUnits.Name(unit)} times {timeUnit}; it has a default only for the time unit \"s\"");
            }

            return new MechanicsSpec((string)lagrangian.Value, planck, lagrangian.ContentSpan);
        }

        /// <summary>An array of one finite number per state, each passed to <paramref name="check"/>.</summary>
        private PerStateValues Values(DeckSection section, string key, Action<double, TomlNode> check)
        {
            var array = section.Array(key)!;
            if (array.Items.Count != _grid.Count)
            {
                throw new DeckException(array.Span, $"`{section.Qualified(key)}` has {array.Items.Count} values but there are {_grid.Count} states");
            }

            var values = new double[array.Items.Count];
            for (var k = 0; k < values.Length; k++)
            {
                values[k] = DeckSection.AsNumber(array.Items[k], section.Qualified(key));
                check(values[k], array.Items[k]);
            }

            return new PerStateValues(values, array.Span);
        }

        private static PerStateExpression Expression(DeckSection section, string key)
        {
            var text = section.String(key)!;
            var expression = (string)text.Value;
            return expression.Trim().Length > 0
                ? new PerStateExpression(expression, text.ContentSpan)
                : throw new DeckException(text.ContentSpan, $"`{section.Qualified(key)}` is empty; write an expression such as \"0.5 * x\"");
        }

        private static DeckException NoChoice(DeckSection section, string choices)
            => new(section.Span, section.Exists ? $"[{section.Name}] needs one of {choices}" : $"the deck needs an [{section.Name}] table with {choices}");

        private static double Positive(TomlNode node, string what)
        {
            var value = DeckSection.AsNumber(node, what);
            return value > 0 ? value : throw new DeckException(node.Span, $"`{what}` must be > 0, not {DeckSection.Format(value)}");
        }

        private static void NonNegative(double value, TomlNode node, string what)
        {
            if (value < 0)
            {
                throw new DeckException(node.Span, $"`{what}` cannot be negative ({DeckSection.Format(value)}); rates and populations are >= 0");
            }
        }
    }
}
