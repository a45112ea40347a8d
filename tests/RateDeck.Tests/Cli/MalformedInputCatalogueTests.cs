using RateDeck.Cli;
using RateDeck.Tests.Decks;
using Xunit;

namespace RateDeck.Tests.Cli;

/// <summary>
/// A catalogue of malformed decks and rate files, each as a new user might write it, run through
/// <c>ratedeck check</c>: every one must end with exit 2 and exactly one line on stderr,
/// <c>file:line:column: message</c>, the place marked <c>§</c> in the case's text (or, for a file
/// that cannot be read at all, the <c>csv</c> value naming it). Never "internal error", never a
/// stack trace, never a hang. Several cases are defects found by trying bad input (issue 9 §8).
/// </summary>
public sealed class MalformedInputCatalogueTests : IDisposable
{
    private readonly DeckScratch _scratch = new();

    public void Dispose() => _scratch.Dispose();

    /// <summary>A case: the deck, an optional rate file (rates.csv), and the message expected after the location.</summary>
    public sealed record Case(string Deck, string? Csv, string Message)
    {
        public override string ToString() => Message.Length > 60 ? Message[..60] : Message;
    }

    private static string Deck(string units = "energy = \"eV\"", string temperature = "kT = 0.5",
        string states = "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"a\", \"b\", \"c\"]", string energies = "values = [0.0, 1.0, 2.0]",
        string weights = "values = [1, 3, 5]", string transfer = "kind = \"one_way\"\ndirection = \"toward_smaller\"\ncsv = \"rates.csv\"",
        string run = "t_end = 1.0", string extra = "", string top = "format = 1\ntitle = \"catalogue deck\"")
        => DeckScratch.Valid(units, temperature, states, energies, weights, transfer, run, extra, top);

    private static string Kernel(string kernel) => $"kind = \"kernel\"\ndirection = \"toward_smaller\"\nkernel = \"{kernel}\"";

    private const string _pendulumMechanics = "[mechanics]\nlagrangian = \"§{0}\"\nplanck = 0.05";

    public static TheoryData<Case> Cases() =>
    [
        // Bytes and TOML syntax.
        new(Deck(top: "format = 1 # caf§\uFFFD"), null, "byte 0xE9 is not valid UTF-8; save the file as UTF-8 text"),
        new(Deck(top: "format = 1\ntitle = \"a§\u0001b\""), null, "control character U+0001 in the text; the file must be plain text (is it binary or damaged?)"),
        new(Deck(extra: "x = " + new string('[', 63) + "§[" + new string(']', 64)), null, "TOML syntax: arrays or inline tables nested 64 deep; a deck needs only a few levels"),
        new(Deck(units: "energy = \"eV\"\n§x = " + new string('[', 63) + new string(']', 63)), null, "unknown key `x` in [units]. Its keys are energy, time, model_time, output_time."),
        new("format = 1\ntitle = §\n", null, "TOML syntax: Unexpected token end-of-line found while expecting a value"),
        new(Deck(run: "t_end = 1.0\n§t_end = 2.0"), null, "TOML syntax: The key `run.t_end` is already defined at (19,1) with `t_end = 1.0` and cannot be redefined"),
        new(Deck(extra: "§[[series]]\nx = 1"), null, "arrays of tables ([[...]]) are not part of the deck format; use a plain [table]"),
        new(Deck(top: "format = §2"), null, "this RateDeck reads deck format 1, not 2"),
        new(Deck().TrimEnd('\n') + "\nnote = \"§\\u00", null, "TOML syntax: the file ends inside the escape `\\u00`; \\u takes 4 hex digits and \\U takes 8"),
        // A missing table is reported at the deck's first line and column (found by the fuzz test: no place at all before).
        new(Deck(top: "§title = \"no format line\""), null, "the deck must start with `format = 1` (the deck format version)"),
        new("§" + Deck().Replace("[run]\nt_end = 1.0\n", "", StringComparison.Ordinal), null, "the deck needs a [run] table with `t_end` (the end time of the run, > 0)"),
        new("§" + Deck().Replace("[temperature]\nkT = 0.5\n", "", StringComparison.Ordinal), null, "the deck needs a [temperature] table with kT (in the energy unit) or kelvin"),
        new(Deck(units: "§enrgy = \"eV\""), null, "unknown key `enrgy` in [units]. Did you mean `energy`? Its keys are energy, time, model_time, output_time."),
        // Values of the wrong kind or range.
        new(Deck(units: "energy = \"§ev\""), null, "unknown energy unit \"ev\". Did you mean `eV`? Choose one of \"eV\", \"K\", \"cm-1\", \"J\", \"kJ/mol\", \"none\"."),
        // An escaped newline in an echoed value stays one line (found by the fuzz test: the error broke across two lines).
        new(Deck(units: "energy = \"§\\none\""), null, "unknown energy unit \"\\none\". Did you mean `none`? Choose one of \"eV\", \"K\", \"cm-1\", \"J\", \"kJ/mol\", \"none\"."),
        new(Deck(temperature: "kT = §-0.5"), null, "`temperature.kT` must be > 0, not -0.5"),
        new(Deck(temperature: "kT = §\"warm\""), null, "`temperature.kT` must be a number (like 2.5 or 1e-3), not a string"),
        new(Deck(run: "t_end = 1.0\noutputs = §0"), null, "`run.outputs` must be between 1 and 10000000, not 0"),
        new(Deck(run: "t_end = 1.0\ndt = \"§often\""), null, "`run.dt` is a number > 0 or \"auto\", not \"often\""),
        new(Deck(run: "t_end = 1.0\nsafety = §1.5"), null, "`run.safety` is the fraction of the stability limit used by dt = \"auto\" and must be in (0, 1], not 1.5"),
        new(Deck(states: "coordinates = [1.0, 2.0, §2.0]\nlabels = [\"a\", \"b\", \"c\"]"), null, "coordinates must increase strictly: 2 follows 2"),
        new(Deck(energies: "values = [0.0, §nan, 2.0]"), null, "`energies.values` must be a finite number, not NaN"),
        new(Deck(energies: "values = §[0.0, 1.0]"), null, "`energies.values` has 2 values but there are 3 states"),
        new(Deck(weights: "values = [1, §0, 5]"), null, "a weight must be > 0, not 0"),
        // Parameters and expressions.
        new(Deck(extra: "[parameters]\n§exp = 1"), null, "`exp` is a function or constant of the expressions; give the parameter another name"),
        new(Deck(extra: "[parameters]\n§pi = 3"), null, "`pi` is a function or constant of the expressions; give the parameter another name"),
        new(Deck(extra: "[parameters]\n§e = 2"), null, "`e` is a function or constant of the expressions; give the parameter another name"),
        new(Deck(extra: "[parameters]\n§sqrt = 2"), null, "`sqrt` is a function or constant of the expressions; give the parameter another name"),
        new(Deck(extra: "[parameters]\n§max = 2"), null, "`max` is a function or constant of the expressions; give the parameter another name"),
        new(Deck(extra: "[parameters]\n§x = 2"), null, "`x` is a variable of the expressions (x, y, i, j, kT, q, v); give the parameter another name"),
        new(Deck(transfer: Kernel("1" + string.Concat(Enumerable.Repeat(" + x", 999)) + " §+ x")), null, "expression more than 1000 operations deep (a chain of terms counts one level each): split it, or simplify it"),
        new(Deck(transfer: Kernel("1" + string.Concat(Enumerable.Repeat(" + x", 90_000)).Insert(999 * 4 + 1, "§"))), null, "expression more than 1000 operations deep (a chain of terms counts one level each): split it, or simplify it"),
        new(Deck(transfer: Kernel(new string('(', 256) + "§(x" + new string(')', 257))), null, "expression nested more than 256 levels deep: simplify it"),
        new(Deck(transfer: Kernel("2 * §exq(x)")), null, "unknown function 'exq': did you mean 'exp'?"),
        new(Deck(transfer: Kernel("x *§* 2")), null, "unexpected '*': expected a number, a name or '('; write '^' for a power, not '**'"),
        new(Deck(transfer: Kernel("exp(x§")), null, "unexpected end of expression: expected an operator, ',' or ')' to close the arguments of 'exp' opened at column 14"),
        new(Deck(extra: "[initial]\nexpression = \"§x - 2\""), null, "the initial population of state 'a' (state 1) is -1; it must be finite and zero or more"),
        new(Deck(extra: "[initial]\nvalues = §[0, 0, 0]"), null, "every initial population is 0 and nothing is pumped in, so every population stays 0; give a state, or populations above 0"),
        new(Deck(extra: "[initial]\nstate = \"§d\""), null, "unknown state `d`. The states are a, b, c."),
        // Mechanics: a Lagrangian that does not depend on v, or is not convex in it.
        new(MechanicsDeck("-0.5*q^2"), null, "the Lagrangian fails for state 'a' (state 1): at energy E = 0.1 (state 1) no velocity reaches the energy at q = 0: v dL/dv - L must grow without bound in |v| (L must depend on v and be convex in it, like 0.5*m*v^2 - U(q))"),
        new(MechanicsDeck("abs(v)^0.5 - 0.5*q^2"), null, "the Lagrangian fails for state 'a' (state 1): at energy E = 0.1 (state 1) no velocity reaches the energy at q = 0: v dL/dv - L must grow without bound in |v| (L must depend on v and be convex in it, like 0.5*m*v^2 - U(q))"),
        // The transfer table and the file it names.
        new(Deck(transfer: "kind = \"one_way\"\ndirection = \"toward_smaller\"\ncsv = \"§a\\u0000b.csv\""), null, "`transfer.csv` contains a NUL character (\\u0000); write the file name without it"),
        new(Deck(transfer: "kind = \"one_way\"\ndirection = \"toward_smaller\"\ncsv = \"§/dev/zero\""), null, "cannot read the rate file /dev/zero (it holds more bytes than its size says: a device, not a regular file, or a file still being written; give the path of a finished file)"),
        new(Deck(transfer: "kind = \"one_way\"\ndirection = \"toward_smaller\"\ncsv = \"§\""), null, "`transfer.csv` is empty; name the rate file, like \"rates.csv\""),
        new(Deck(transfer: "kind = \"one_way\"\ndirection = \"§sideways\"\ncsv = \"rates.csv\""), null, "`transfer.direction` cannot be \"sideways\". Choose one of \"toward_smaller\", \"toward_larger\"."),
        // Rate files.
        new(Deck(), "from,to,rate\nb,a,2e3§\u0000\n", "control character U+0000 in the text; the file must be plain text (is it binary or damaged?)"),
        new(Deck(), "from,to,rate\nb,a,1.0\nc,§\uFFFD,2.0\n", "byte 0xE9 is not valid UTF-8; save the file as UTF-8 text"),
        new(Deck(), "from,to,rate\nb,a,§fast\n", "`fast` is not a number; a rate is written like 2.5e3"),
        new(Deck(), "from,to,rate\nb,a,§-1\n", "a rate cannot be negative (-1); rates are >= 0"),
        new(Deck(), "from,to,rate\nb,a,§1e999\n", "a rate must be finite"),
        new(Deck(), "from,to,rate\nb,a,§NaN\n", "a rate cannot be NaN; give a measured value or leave the row out"),
        new(Deck(), "from,to,rate\nb,§b,1\n", "a state cannot have a rate to itself: the diagonal of the rate matrix follows from conservation; remove this row"),
        new(Deck(), "from,to,rate\na,§b,1\n", "this row goes against the declared direction = \"toward_smaller\" (the reverse rates are completed by detailed balance); fix the row or the direction"),
        new(Deck(), "from,to,rate\nb,a,1\n§b,a,2\n", "the rate from this state to that one is already given on line 2; give each pair once"),
        new(Deck(), "from,to,§speed\nb,a,1\n", "unknown column `speed`. The header must name the columns from,to,rate."),
        new(Deck(), "from,to,rate\nb,a,1,§7\n", "this row has 4 cells; every row needs 3: from,to,rate"),
        new(Deck(), "from,to,rate\n§z,a,1\n", "unknown state `z`. The states are a, b, c."),
        new(Deck(), "§", "the rate file is empty; it needs a header line `from,to,rate` and one row per rate"),
    ];

    private static string MechanicsDeck(string lagrangian) => Deck(
        units: "energy = \"none\"", states: "coordinates = [0.1, 0.2, 0.3]\nlabels = [\"a\", \"b\", \"c\"]", energies: "expression = \"x\"",
        weights: "from_mechanics = true", extra: string.Format(System.Globalization.CultureInfo.InvariantCulture, _pendulumMechanics, lagrangian));

    [Trait("Through", "program")]
    [Theory]
    [MemberData(nameof(Cases))]
    public void MalformedInput_IsOneLocatedLineWithExitTwo(Case item)
    {
        var (deckText, deckPlaces) = DeckScratch.UnmarkAll(item.Deck.Replace("\uFFFD", "\u00E9", StringComparison.Ordinal));
        var deckBytes = Latin1Marked(deckText, item.Deck);
        File.WriteAllBytes(_scratch.DeckPath, deckBytes);
        var expectedFile = _scratch.DeckPath;
        var places = deckPlaces;
        if (item.Csv is { } csv)
        {
            var (csvText, csvPlaces) = DeckScratch.UnmarkAll(csv.Replace("\uFFFD", "\u00E9", StringComparison.Ordinal));
            File.WriteAllBytes(Path.Combine(_scratch.Directory, "rates.csv"), Latin1Marked(csvText, csv));
            expectedFile = Path.Combine(_scratch.Directory, "rates.csv");
            places = csvPlaces;
        }

        Assert.True(places.Count == 1, "a case marks exactly one place");
        var (code, output, error) = CliRunner.Run("check", _scratch.DeckPath);

        Assert.Equal($"{expectedFile}:{places[0].Line}:{places[0].Column}: {item.Message}\n", error);
        Assert.Equal(ExitCodes.BadInput, code);
        Assert.Equal("", output);
    }

    /// <summary>
    /// Rates at the ends of the double range beside ordinary ones, found by the fuzz test to end in
    /// "internal error" (the managed eigen-solver overflowed, the double-double one never
    /// converged): each now checks cleanly, and the steady state is the Boltzmann distribution
    /// g_i exp(-E_i/kT) / Z that detailed balance implies for one closed class (common practice;
    /// van Kampen, Stochastic Processes in Physics and Chemistry, ch. V, from memory).
    /// </summary>
    [Trait("Through", "program")]
    [Theory]
    [InlineData("from,to,rate\nb,a,1e308\nc,b,2\nc,a,0.5\n")]
    [InlineData("from,to,rate\nb,a,1e300\nc,b,1e15\n")]
    [InlineData("from,to,rate\nb,a,1e-307\nc,b,1e15\n")]
    [InlineData("from,to,rate\nb,a,1e-6\nc,b,1e308\n")]
    public void RatesAtTheEndsOfTheDoubleRange_CheckCleanlyAndGiveTheBoltzmannSteadyState(string rates)
    {
        File.WriteAllText(_scratch.DeckPath, Deck());
        File.WriteAllText(Path.Combine(_scratch.Directory, "rates.csv"), rates);

        var check = CliRunner.Run("check", _scratch.DeckPath);
        var steady = CliRunner.Run("steady", _scratch.DeckPath, "--json", "--out", Path.Combine(_scratch.Directory, "out"));
        var run = CliRunner.Run("run", _scratch.DeckPath, "--exact-only", "--no-plots", "--json", "--out", Path.Combine(_scratch.Directory, "out"));

        Assert.True(check.ExitCode == ExitCodes.Success, check.Error + check.Out);
        Assert.True(steady.ExitCode == ExitCodes.Success, steady.Error);
        Assert.True(run.ExitCode == ExitCodes.Success, run.Error);
        // A closed deck without pumping keeps its total population (common practice: columns of K sum to zero).
        using (var summary = System.Text.Json.JsonDocument.Parse(run.Out))
        {
            Assert.Equal(1.0, summary.RootElement.GetProperty("final_total_population").GetDouble(), 1e-9);
        }

        using var json = System.Text.Json.JsonDocument.Parse(steady.Out);
        var populations = json.RootElement.GetProperty("populations").EnumerateArray().Select(p => p.GetDouble()).ToArray();
        // The catalogue deck: energies 0, 1, 2 eV, weights 1, 3, 5, kT = 0.5 eV.
        double[] boltzmann = [1, 3 * Math.Exp(-2), 5 * Math.Exp(-4)];
        var z = boltzmann.Sum();
        for (var i = 0; i < 3; i++)
        {
            Assert.Equal(boltzmann[i] / z, populations[i], 1e-9);
        }
    }

    [Fact]
    public void Catalogue_HoldsAtLeastFortyDistinctCases()
    {
        var cases = ((IEnumerable<object[]>)Cases()).Select(row => (Case)row[0]).ToList();
        Assert.True(cases.Count >= 40, $"{cases.Count} cases");
        Assert.Equal(cases.Count, cases.Select(c => (c.Deck, c.Csv)).Distinct().Count());
    }

    [Trait("Through", "program")]
    [Fact]
    public async Task RateFileThatIsAFifoWithoutWriter_IsRefusedWithoutBlocking()
    {
        var fifo = Path.Combine(_scratch.Directory, "pipe.csv");
        using (var mkfifo = System.Diagnostics.Process.Start("mkfifo", fifo))
        {
            mkfifo.WaitForExit();
        }

        var (deckText, line, column) = DeckScratch.Unmark(Deck(transfer: "kind = \"one_way\"\ndirection = \"toward_smaller\"\ncsv = \"§pipe.csv\""));
        File.WriteAllText(_scratch.DeckPath, deckText);
        var run = Task.Run(() => CliRunner.Run("check", _scratch.DeckPath));

        var (code, _, error) = await run.WaitAsync(TimeSpan.FromSeconds(30));
        Assert.Equal($"{_scratch.DeckPath}:{line}:{column}: cannot read the rate file {fifo} (it is a pipe, socket or device, not a regular file; give the path of a file)\n", error);
        Assert.Equal(ExitCodes.BadInput, code);
    }

    /// <summary>UTF-8 bytes of the text, except that a case written with U+FFFD stands for the lone byte 0xE9 (Latin-1 é), which is not UTF-8.</summary>
    private static byte[] Latin1Marked(string text, string original)
    {
        if (!original.Contains('\uFFFD', StringComparison.Ordinal))
        {
            return System.Text.Encoding.UTF8.GetBytes(text);
        }

        var bytes = new List<byte>();
        foreach (var c in text)
        {
            if (c == '\u00E9')
            {
                bytes.Add(0xE9);
            }
            else
            {
                bytes.AddRange(System.Text.Encoding.UTF8.GetBytes(c.ToString()));
            }
        }

        return [.. bytes];
    }
}
