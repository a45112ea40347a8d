using System.Globalization;
using RateDeck.Decks;
using RateDeck.LinearAlgebra;
using RateDeck.Pipeline;
using RateDeck.Propagation;

namespace RateDeck.Bench;

/// <summary>
/// One fitting trial: a deck with a new kT, assembled, then propagated exactly to its output
/// times (t = 0 and 60 more on both demo decks). Two ways side by side: the deck read again with a
/// <c>--set temperature.kT=...</c> text override (the TOML parsed, the rate file read, every
/// expression compiled and the mechanics derived again), and a deck read once then derived per
/// trial with <see cref="Deck.With(IEnumerable{DeckOverride})"/> and a typed kT. Each trial takes a
/// different kT (cycling over eight values a few per cent apart), so no trial repeats the last one.
/// Targets (issue 8): cascade at most 2 ms, pendulum ladder with kT changed at most 5 ms.
/// </summary>
internal static class TrialBench
{
    private static readonly string[] _decks = ["cascade.toml", "pendulum-ladder.toml"];

    public static void Run(int runs, TextWriter output)
    {
        var algebra = LinearAlgebraProviders.Select(null, out var algebraReason);
        output.WriteLine($"one trial = kT changed, assemble, exact propagation to the deck's output times; linear algebra: {algebraReason}");
        output.WriteLine("deck                   outputs  read again with --set (ms)   derived with Deck.With (ms)   path");
        foreach (var name in _decks)
        {
            var path = Path.Combine(DecksFolder(), name);
            var baseDeck = DeckReader.Read(path, []);
            var trial = 0;
            double NextKT() => baseDeck.KT * (1 + 0.01 * (trial++ % 8));
            string reason = "";
            void Reread() => Propagate(DeckPipeline.Load(path, [$"temperature.kT={NextKT().ToString("R", CultureInfo.InvariantCulture)}"], algebra), out _);
            void Derived() => Propagate(DeckPipeline.Assemble(baseDeck.With(DeckOverride.KT(NextKT())), algebra), out reason);

            var seconds = Timing.Measure([Reread, Derived], warmups: 3, runs);
            var count = RunSetup.OutputTimes(baseDeck.Run).Length - 1;
            output.WriteLine(string.Create(
                CultureInfo.InvariantCulture,
                $"{name,-22} {count,7}  {Describe(seconds[0]),-27}  {Describe(seconds[1]),-28}  {reason.Split(':')[0]}"));
        }
    }

    private static void Propagate(LoadedDeck loaded, out string reason)
    {
        var initial = RunSetup.InitialPopulations(loaded.Deck, loaded.States);
        var propagator = ExactPropagatorChoice.Choose(loaded.Rates, loaded.Algebra, initial: initial);
        var trajectory = propagator.Propagate(initial, RunSetup.OutputTimes(loaded.Deck.Run));
        reason = propagator.Reason;
        if (!trajectory.Populations[^1].All(double.IsFinite))
        {
            throw new InvalidOperationException("the trial's populations are not finite");
        }
    }

    /// <summary>Median (minimum .. maximum) in milliseconds.</summary>
    private static string Describe(double[] seconds) => string.Create(
        CultureInfo.InvariantCulture,
        $"{Timing.Median(seconds) * 1e3:F3} ({seconds.Min() * 1e3:F3} .. {seconds.Max() * 1e3:F3})");

    /// <summary>The repository's decks/ folder, found upward from the bench's build folder.</summary>
    private static string DecksFolder()
    {
        for (var folder = new DirectoryInfo(AppContext.BaseDirectory); folder is not null; folder = folder.Parent)
        {
            var decks = Path.Combine(folder.FullName, "decks");
            if (File.Exists(Path.Combine(decks, "cascade.toml")))
            {
                return decks;
            }
        }

        throw new DirectoryNotFoundException("the demo decks (decks/cascade.toml) are not above the bench's folder");
    }
}
