using RateDeck.Decks;
using RateDeck.Diagnostics;
using RateDeck.Outputs;
using RateDeck.Pipeline;
using RateDeck.Propagation;

namespace RateDeck.Cli.Verbs;

/// <summary>
/// The files of a run, staged in a <see cref="StagedOutputFolder"/> so that they enter the folder all
/// together or not at all: populations of both methods, their differences, the spectrum, the steady
/// state, the one-row table of scalar results (<see cref="RunResultsFile"/>), and the plots.
/// </summary>
internal sealed class RunOutputs(LoadedDeck loaded, string folder, DeckRun run)
{
    private readonly OutputHeader _header = OutputHeader.For(loaded.Deck);
    private StagedOutputFolder? _staging;

    /// <summary>Why the plots asked for were not drawn (no font), or null.</summary>
    public string? PlotsRefused { get; private set; }

    /// <summary>Writes every output and returns the file names, in the order written.</summary>
    public IReadOnlyList<string> Write(Trajectory exact, Trajectory? explicitResult, Spectrum spectrum,
        SteadyStateResult steady, double dt, ExplicitMethod method, bool plots, bool writeRates = false)
    {
        using var staging = _staging = StagedOutputFolder.Begin(folder);
        var deck = loaded.Deck;
        var labels = loaded.States.Labels;
        WriteFile("populations-exact.csv", path => ResultCsv.WriteTrajectory(path, _header, labels, exact, deck.TimeUnit));
        if (explicitResult is not null)
        {
            WriteFile($"populations-{VerbSupport.MethodName(method)}.csv", path => ResultCsv.WriteTrajectory(path, _header, labels, explicitResult, deck.TimeUnit));
            WriteFile("differences.csv", path => ResultCsv.WriteDifferences(path, _header, labels, exact, explicitResult, deck.TimeUnit));
        }

        WriteFile("spectrum.csv", path => ResultCsv.WriteSpectrum(path, _header, spectrum.ReportedValues, deck.TimeUnit, spectrum.ReportedZeroTolerance, spectrum.ReportedValuesNote,
            spectrum.ModeNumbers, spectrum.Coverage));
        if (steady.Populations is { } steadyPopulations)
        {
            WriteFile("steady-state.csv", path => ResultCsv.WriteSteadyState(path, _header, labels, loaded.States.Coordinates, steadyPopulations, loaded.States.LogEquilibrium));
        }

        if (loaded.Deck.EquilibriumGiven.HasFlag(EquilibriumGiven.Energies))
        {
            WriteFile("boltzmann-final.csv", path => ResultCsv.WriteBoltzmannTable(path, _header, loaded.States, exact.Populations[^1], EnergyUnits.Name(deck.EnergyUnit)));
        }

        if (writeRates)
        {
            WriteFile("rate-matrix.csv", path => ResultCsv.WriteRateMatrix(path, _header, loaded.Rates, deck.TimeUnit));
        }

        WriteFile(RunResultsFile.Name, path => RunResultsFile.Write(path, _header, run));
        PlotsRefused = plots ? Plots.Unavailable : null;
        if (plots && PlotsRefused is null)
        {
            WritePlots(exact, explicitResult, spectrum, steady, dt, method);
        }

        staging.Commit();
        return staging.Written;
    }

    private void WritePlots(Trajectory exact, Trajectory? explicitResult, Spectrum spectrum, SteadyStateResult steady, double dt, ExplicitMethod method)
    {
        var results = new RunResults(exact, explicitResult, spectrum.Values, spectrum.ZeroTolerance, steady.Populations, dt, VerbSupport.MethodName(method))
        {
            ModeNumbers = spectrum.ModeNumbers,
            ModeCount = spectrum.ModeCount,
            Coverage = spectrum.Coverage,
        };
        foreach (var (name, write) in RunPlots.Files(loaded.Deck, loaded.States, results))
        {
            WriteFile(name, write);
        }
    }

    private void WriteFile(string name, Action<string> write) => write(_staging!.PathOf(name));
}
