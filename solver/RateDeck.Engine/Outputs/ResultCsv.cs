using System.Globalization;
using System.Numerics;
using CsvHelper;
using RateDeck.Propagation;

namespace RateDeck.Outputs;

/// <summary>A named numeric column of a <see cref="ResultCsv.WritePerStateTable"/> or <see cref="ResultCsv.WriteColumns"/> file.</summary>
/// <param name="Name">Column header, e.g. <c>energy</c> or <c>period</c>.</param>
/// <param name="Values">One value per row (per state, in state order, in a per-state table).</param>
/// <param name="Unit">The unit, written to a <c># units:</c> comment line; null for a pure number.</param>
public sealed record CsvColumn(string Name, IReadOnlyList<double> Values, string? Unit = null);

/// <summary>
/// The CSV result files. Each starts with the <see cref="OutputHeader"/> comment lines, then
/// file-specific <c># key: value</c> notes (units, what a value means), then a header row. Numbers
/// are written by <see cref="CsvNumber"/>: invariant culture, exact round trip, <c>inf</c>/<c>nan</c>.
/// Files are written through <see cref="AtomicFile"/>. Read them with <see cref="ReaderOptions"/>.
/// </summary>
public static class ResultCsv
{
    private static readonly CsvWriterOptions _writerOptions = new()
    {
        NewLine = "\n",
        // With the prefix set, CsvHelper quotes a field that starts with '#', so a state label such
        // as "#3" in the first column cannot be mistaken for a comment when read back.
        CommentPrefix = OutputHeader.CommentChar,
        FormatProvider = CultureInfo.InvariantCulture,
    };

    /// <summary>Reader settings that skip the comment lines and take the first row as the header.</summary>
    public static CsvReaderOptions ReaderOptions { get; } = new()
    {
        CommentPrefix = OutputHeader.CommentChar,
        HasHeader = true,
        FormatProvider = CultureInfo.InvariantCulture,
    };

    /// <summary>
    /// Populations over time: columns <c>time</c>, then one per state label.
    /// Row k holds <c>trajectory.Populations[k]</c>.
    /// </summary>
    public static void WriteTrajectory(string path, OutputHeader header, IReadOnlyList<string> stateLabels, Trajectory trajectory, string timeUnit)
    {
        ArgumentNullException.ThrowIfNull(trajectory);
        RequireRows(trajectory, stateLabels.Count, nameof(trajectory));
        WriteTimeTable(path, header, stateLabels, trajectory.Times, timeUnit, "populations", (k, i) => trajectory.Populations[k][i]);
    }

    /// <summary>
    /// Absolute difference |explicit - exact| per state at each output time: columns <c>time</c>,
    /// then one per state label. Both trajectories must share their output times.
    /// </summary>
    public static void WriteDifferences(string path, OutputHeader header, IReadOnlyList<string> stateLabels, Trajectory exact, Trajectory explicitResult, string timeUnit)
    {
        ArgumentNullException.ThrowIfNull(exact);
        ArgumentNullException.ThrowIfNull(explicitResult);
        RequireRows(exact, stateLabels.Count, nameof(exact));
        RequireRows(explicitResult, stateLabels.Count, nameof(explicitResult));
        if (!exact.Times.AsSpan().SequenceEqual(explicitResult.Times))
        {
            throw new ArgumentException("The exact and explicit trajectories must have the same output times.", nameof(explicitResult));
        }
        WriteTimeTable(path, header, stateLabels, exact.Times, timeUnit, "|explicit - exact| per state",
            (k, i) => Math.Abs(explicitResult.Populations[k][i] - exact.Populations[k][i]));
    }

    /// <summary>
    /// Real eigenvalues of the generator: columns <c>mode</c> (numbered from 1, in the given order),
    /// <c>eigenvalue</c> (per time unit) and <c>relaxation_time</c> = 1 / |lambda| (time unit),
    /// <c>inf</c> for a zero mode, i.e. |lambda| &lt;= <paramref name="zeroTolerance"/>. A
    /// <paramref name="modesNote"/> (where each row's value comes from) is written as a <c># modes:</c> line.
    /// A partial spectrum gives each row's <paramref name="modeNumbers"/> (its place in the whole
    /// spectrum, from 1) and a <paramref name="coverage"/> line saying which modes the file holds.
    /// </summary>
    public static void WriteSpectrum(string path, OutputHeader header, IReadOnlyList<double> eigenvalues, string timeUnit, double zeroTolerance = 0, string? modesNote = null,
        IReadOnlyList<int>? modeNumbers = null, string? coverage = null)
    {
        ArgumentNullException.ThrowIfNull(eigenvalues);
        WriteTable(path, header, SpectrumNotes(timeUnit, zeroTolerance, modesNote, coverage), ["mode", "eigenvalue", "relaxation_time"], eigenvalues.Count, (k, row) =>
        {
            row.WriteField(ModeNumber(k, modeNumbers));
            row.WriteField(CsvNumber.Format(eigenvalues[k]));
            row.WriteField(CsvNumber.Format(RelaxationTime(eigenvalues[k], zeroTolerance)));
        });
    }

    /// <summary>
    /// Complex eigenvalues (a generator without detailed balance): columns <c>mode</c> (from 1),
    /// <c>eigenvalue_re</c>, <c>eigenvalue_im</c> and <c>relaxation_time</c> = 1 / |Re lambda|, the
    /// decay time of the mode's amplitude, <c>inf</c> when |Re lambda| &lt;= <paramref name="zeroTolerance"/>.
    /// A <paramref name="modesNote"/> (where each row's value comes from) is written as a <c># modes:</c> line;
    /// <paramref name="modeNumbers"/> and <paramref name="coverage"/> as for real eigenvalues.
    /// </summary>
    public static void WriteSpectrum(string path, OutputHeader header, IReadOnlyList<Complex> eigenvalues, string timeUnit, double zeroTolerance = 0, string? modesNote = null,
        IReadOnlyList<int>? modeNumbers = null, string? coverage = null)
    {
        ArgumentNullException.ThrowIfNull(eigenvalues);
        WriteTable(path, header, SpectrumNotes(timeUnit, zeroTolerance, modesNote, coverage), ["mode", "eigenvalue_re", "eigenvalue_im", "relaxation_time"], eigenvalues.Count, (k, row) =>
        {
            row.WriteField(ModeNumber(k, modeNumbers));
            row.WriteField(CsvNumber.Format(eigenvalues[k].Real));
            row.WriteField(CsvNumber.Format(eigenvalues[k].Imaginary));
            row.WriteField(CsvNumber.Format(RelaxationTime(eigenvalues[k].Real, zeroTolerance)));
        });
    }

    /// <summary>Modes are numbered from 1 in files, as a reader counts them; a partial spectrum gives each row's number.</summary>
    private static string ModeNumber(int k, IReadOnlyList<int>? modeNumbers) => (modeNumbers?[k] ?? (k + 1)).ToString(CultureInfo.InvariantCulture);

    /// <summary>
    /// The steady state beside the equilibrium: columns <c>label</c>, <c>coordinate</c>,
    /// <c>population</c>, <c>equilibrium</c> = pi_i and <c>ln_equilibrium</c> = ln pi_i. The
    /// logarithm is written too because pi_i underflows to 0 below about 1e-308 while ln pi_i stays exact.
    /// </summary>
    public static void WriteSteadyState(string path, OutputHeader header, IReadOnlyList<string> labels, IReadOnlyList<double> coordinates,
        IReadOnlyList<double> population, IReadOnlyList<double> logEquilibrium)
    {
        WritePerStateTable(path, header, labels,
        [
            new CsvColumn("coordinate", coordinates),
            new CsvColumn("population", population),
            new CsvColumn("equilibrium", logEquilibrium.Select(Math.Exp).ToArray()),
            new CsvColumn("ln_equilibrium", logEquilibrium),
        ]);
    }

    /// <summary>
    /// The assembled rate matrix K as triplets: columns <c>from</c>, <c>to</c> (state labels) and
    /// <c>rate</c> = K[to, from] per time unit, one row per stored entry, the diagonal (minus the
    /// outflow and loss of a state) included, in column order. Zero off-diagonal entries are left
    /// out, so a sparse deck's file grows with its stored entries, not with N^2.
    /// </summary>
    public static void WriteRateMatrix(string path, OutputHeader header, Rates.RateMatrix rates, string timeUnit)
    {
        ArgumentNullException.ThrowIfNull(rates);
        var entries = new List<(int To, int From, double Rate)>();
        rates.ForEachOffDiagonal((to, from, rate) =>
        {
            if (rate != 0)
            {
                entries.Add((to, from, rate));
            }
        });
        entries.AddRange(Enumerable.Range(0, rates.Count).Select(j => (j, j, rates.Diagonal(j))));
        entries.Sort((a, b) => a.From != b.From ? a.From.CompareTo(b.From) : a.To.CompareTo(b.To));
        var labels = rates.States.Labels;
        KeyValuePair<string, string>[] notes =
        [
            new("values", $"K[to, from], the rate from state `from` to state `to` in 1/{timeUnit}; the diagonal from = to is minus the outflow and the loss"),
        ];
        WriteTable(path, header, notes, ["from", "to", "rate"], entries.Count, (k, row) =>
        {
            row.WriteField(labels[entries[k].From]);
            row.WriteField(labels[entries[k].To]);
            row.WriteField(CsvNumber.Format(entries[k].Rate));
        });
    }

    /// <summary>
    /// The Boltzmann-plot table at one time: columns <c>label</c>, <c>energy</c>, <c>weight</c> g_i,
    /// <c>population</c> n_i, <c>population_per_weight</c> n_i / g_i and <c>ln_population_per_weight</c>
    /// (empty as <c>-inf</c> where n_i &lt;= 0). Under a Boltzmann law ln(n_i / g_i) falls on a line of
    /// slope -1/kT in E_i.
    /// </summary>
    public static void WriteBoltzmannTable(string path, OutputHeader header, States.StateSpace states, IReadOnlyList<double> population, string energyUnit)
    {
        ArgumentNullException.ThrowIfNull(states);
        ArgumentNullException.ThrowIfNull(population);
        // The weights as given (3, not exp(ln 3) = 3.0000000000000004); from their logarithms only where no other form exists.
        var weights = states.Weights ?? states.LogWeights.Select(Math.Exp).ToArray();
        var perWeight = population.Select((n, i) => n / weights[i]).ToArray();
        WritePerStateTable(path, header, states.Labels,
        [
            new CsvColumn("energy", states.Energies, energyUnit),
            new CsvColumn("weight", weights),
            new CsvColumn("population", population),
            new CsvColumn("population_per_weight", perWeight),
            new CsvColumn("ln_population_per_weight", population.Select((n, i) => n > 0 ? Math.Log(n) - states.LogWeights[i] : double.NegativeInfinity).ToArray()),
        ]);
    }

    /// <summary>
    /// A per-state table of derived quantities (energies, actions, periods, weights...): column
    /// <c>label</c>, then one per <paramref name="columns"/> entry. Units, where given, go to a
    /// <c># units: name=unit, ...</c> comment line.
    /// </summary>
    public static void WritePerStateTable(string path, OutputHeader header, IReadOnlyList<string> labels, IReadOnlyList<CsvColumn> columns)
    {
        ArgumentNullException.ThrowIfNull(labels);
        WriteColumnTable(path, header, labels, columns);
    }

    /// <summary>
    /// A table of numeric columns of equal length (e.g. fit residuals: time, observed, fitted,
    /// residual), one column per <paramref name="columns"/> entry, units as in <see cref="WritePerStateTable"/>.
    /// </summary>
    public static void WriteColumns(string path, OutputHeader header, IReadOnlyList<CsvColumn> columns) =>
        WriteColumnTable(path, header, null, columns);

    private static void WriteColumnTable(string path, OutputHeader header, IReadOnlyList<string>? labels, IReadOnlyList<CsvColumn> columns)
    {
        ArgumentNullException.ThrowIfNull(columns);
        var rowCount = labels?.Count ?? (columns.Count == 0 ? 0 : columns[0].Values.Count);
        foreach (var column in columns)
        {
            if (column.Values.Count != rowCount)
            {
                throw new ArgumentException($"Column '{column.Name}' has {column.Values.Count} values where {rowCount} are expected.", nameof(columns));
            }
        }
        var units = string.Join(", ", columns.Where(c => c.Unit is not null).Select(c => $"{c.Name}={c.Unit}"));
        var notes = units.Length == 0 ? [] : new[] { KeyValuePair.Create("units", units) };
        string[] names = labels is null ? [.. columns.Select(c => c.Name)] : ["label", .. columns.Select(c => c.Name)];
        WriteTable(path, header, notes, names, rowCount, (i, row) =>
        {
            if (labels is not null)
            {
                row.WriteField(labels[i]);
            }
            foreach (var column in columns)
            {
                row.WriteField(CsvNumber.Format(column.Values[i]));
            }
        });
    }

    /// <summary>
    /// A table of text cells (numbers already formatted by <see cref="CsvNumber"/>): the provenance
    /// header when <paramref name="header"/> is given, the <paramref name="notes"/>, the column
    /// names, then one line per row. Cells are quoted where CSV needs it (a comma, a quote, a line break).
    /// </summary>
    public static void WriteRecords(string path, OutputHeader? header, IEnumerable<KeyValuePair<string, string>> notes,
        IReadOnlyList<string> columnNames, IReadOnlyList<IReadOnlyList<string>> rows)
    {
        ArgumentNullException.ThrowIfNull(columnNames);
        ArgumentNullException.ThrowIfNull(rows);
        if (rows.FirstOrDefault(r => r.Count != columnNames.Count) is { } uneven)
        {
            throw new ArgumentException($"A row has {uneven.Count} cells where {columnNames.Count} are expected.", nameof(rows));
        }

        WriteTable(path, header, notes, [.. columnNames], rows.Count, (k, row) =>
        {
            foreach (var cell in rows[k])
            {
                row.WriteField(cell);
            }
        });
    }

    /// <summary>
    /// Reads a file written by <see cref="WriteRecords"/> (or any result CSV): the <c># key: value</c>
    /// comment lines in order, the column names and the rows of text cells.
    /// </summary>
    /// <exception cref="IOException">The file cannot be read.</exception>
    /// <exception cref="CsvFormatException">The file is not CSV.</exception>
    public static CsvRecords ReadRecords(string path)
    {
        var bytes = File.ReadAllBytes(path);
        var notes = new List<KeyValuePair<string, string>>();
        foreach (var line in AtomicFile.TextEncoding.GetString(bytes).Split('\n').TakeWhile(l => l.StartsWith(OutputHeader.CommentChar)))
        {
            var colon = line.IndexOf(": ", StringComparison.Ordinal);
            if (colon > 2)
            {
                notes.Add(KeyValuePair.Create(line[2..colon], line[(colon + 2)..]));
            }
        }

        using var reader = CsvReader.Create(bytes, new CsvReaderOptions { HasHeader = false, CommentPrefix = OutputHeader.CommentChar, FormatProvider = CultureInfo.InvariantCulture });
        var rows = new List<string[]>();
        while (reader.Read())
        {
            rows.Add([.. Enumerable.Range(0, reader.FieldCount).Select(k => reader.GetString(k))]);
        }

        return rows.Count == 0 ? new CsvRecords(notes, [], []) : new CsvRecords(notes, rows[0], rows.Skip(1).ToArray());
    }

    private static double RelaxationTime(double rate, double zeroTolerance) =>
        Math.Abs(rate) <= zeroTolerance ? double.PositiveInfinity : 1.0 / Math.Abs(rate);

    private static KeyValuePair<string, string>[] SpectrumNotes(string timeUnit, double zeroTolerance, string? modesNote, string? coverage) =>
    [
        .. coverage is null ? [] : new[] { KeyValuePair.Create("coverage", coverage) },
        KeyValuePair.Create("eigenvalue_unit", $"1/{timeUnit}"),
        KeyValuePair.Create("time_unit", timeUnit),
        KeyValuePair.Create("zero_tolerance", CsvNumber.Format(zeroTolerance)),
        .. modesNote is null ? [] : new[] { KeyValuePair.Create("modes", modesNote) },
    ];

    private static void RequireRows(Trajectory trajectory, int stateCount, string name)
    {
        if (trajectory.Populations.Length != trajectory.Times.Length || trajectory.Populations.Any(p => p.Length != stateCount))
        {
            throw new ArgumentException($"Expected {trajectory.Times.Length} rows of {stateCount} populations.", name);
        }
    }

    /// <summary>
    /// A table of times by states. Its rows hold numbers only, which never need quoting, so they
    /// are formatted into one buffer per row and written as they are (a dense run's populations
    /// are N x 101 numbers); the header row of labels goes through the CSV writer.
    /// </summary>
    private static void WriteTimeTable(string path, OutputHeader header, IReadOnlyList<string> stateLabels, double[] times, string timeUnit,
        string quantity, Func<int, int, double> value)
    {
        KeyValuePair<string, string>[] notes = [KeyValuePair.Create("time_unit", timeUnit), KeyValuePair.Create("values", quantity)];
        WriteTable(path, header, notes, ["time", .. stateLabels], 0, (_, _) => { }, writer =>
        {
            var row = new char[(stateLabels.Count + 1) * (CsvNumber.MaxLength + 1)];
            for (var k = 0; k < times.Length; k++)
            {
                var length = CsvNumber.Write(times[k], row);
                for (var i = 0; i < stateLabels.Count; i++)
                {
                    row[length++] = ',';
                    length += CsvNumber.Write(value(k, i), row.AsSpan(length));
                }

                row[length++] = '\n';
                writer.Write(row, 0, length);
            }
        });
    }

    /// <summary>
    /// The provenance header or the notes, the column names, <paramref name="rowCount"/> rows by
    /// <paramref name="writeRow"/>, then <paramref name="writeRawRows"/> when given: rows written
    /// straight to the text after the CSV writer's, for cells that never need quoting.
    /// </summary>
    private static void WriteTable(string path, OutputHeader? header, IEnumerable<KeyValuePair<string, string>> notes,
        string[] columnNames, int rowCount, Action<int, CsvWriter> writeRow, Action<TextWriter>? writeRawRows = null)
    {
        AtomicFile.Write(path, writer =>
        {
            if (header is null)
            {
                OutputHeader.WriteNotes(writer, notes);
            }
            else
            {
                header.WriteTo(writer, notes);
            }

            using var csv = CsvWriter.Create(writer, _writerOptions, leaveOpen: true);
            csv.WriteRecord(columnNames);
            for (var row = 0; row < rowCount; row++)
            {
                writeRow(row, csv);
                csv.EndRecord();
            }
            csv.Flush();
            writeRawRows?.Invoke(writer);
        });
    }
}

/// <summary>What <see cref="ResultCsv.ReadRecords"/> read: the comment notes, the column names and the rows of text cells.</summary>
/// <param name="Notes">The <c># key: value</c> lines at the top, in order (the provenance lines included).</param>
/// <param name="Columns">The column names; empty for an empty file.</param>
/// <param name="Rows">The data rows.</param>
public sealed record CsvRecords(IReadOnlyList<KeyValuePair<string, string>> Notes, IReadOnlyList<string> Columns, IReadOnlyList<string[]> Rows)
{
    /// <summary>The value of the note <paramref name="key"/>, or null.</summary>
    public string? Note(string key) => Notes.FirstOrDefault(n => n.Key == key).Value;
}
