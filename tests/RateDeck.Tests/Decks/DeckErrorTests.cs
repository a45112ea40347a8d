using RateDeck.Decks;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary>
/// Every class of bad deck input fails with a <see cref="DeckException"/> at the exact one-based
/// line and column of the offending key or value, with a message that says what to do.
/// </summary>
public sealed class DeckErrorTests : IDisposable
{
    private readonly DeckScratch _scratch = new();

    public void Dispose() => _scratch.Dispose();

    [Fact]
    public void MissingDeckFile_IsReportedAtThePathWithoutLine()
    {
        var path = Path.Combine(_scratch.Directory, "absent.toml");
        var error = Assert.Throws<DeckException>(() => DeckReader.Read(path, []));
        Assert.Equal(SourceSpan.None(path), error.Span);
        Assert.Contains("no such file", error.Problem);
    }

    [Fact]
    public void TomlSyntaxError_CarriesTomlynPosition()
    {
        // "title = " followed by the end of the line: the value is missing at line 2, column 9.
        var error = _scratch.FailAt("format = 1\ntitle = §\n");
        Assert.Equal(2, error.Span.Line);
        Assert.Equal(9, error.Span.Column);
        Assert.StartsWith("TOML syntax:", error.Problem);
    }

    [Fact]
    public void DuplicateTomlKey_IsASyntaxErrorAtTheSecondKey()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\n§t_end = 2.0"));
        Assert.Contains("already defined", error.Problem);
    }

    [Fact]
    public void ArrayOfTables_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "§[[series]]\nx = 1"));
        Assert.Contains("arrays of tables", error.Problem);
    }

    [Fact]
    public void UnknownTopLevelKey_SuggestsTheClosestName()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(top: "format = 1\n§titel = \"x\""));
        Assert.Contains("unknown key `titel`", error.Problem);
        Assert.Contains("Did you mean `title`?", error.Problem);
    }

    [Fact]
    public void UnknownTable_SuggestsTheClosestTable()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "[§pumpin]\nvalues = [1, 2, 3]"));
        Assert.Contains("Did you mean `pumping`?", error.Problem);
    }

    [Fact]
    public void UnknownKeyInTable_SuggestsTheClosestKeyAndListsTheKeys()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\n§outptus = 10"));
        Assert.Equal("unknown key `outptus` in [run]. Did you mean `outputs`? Its keys are t_end, outputs, spacing, t_first, explicit, dt, safety, accuracy, times, plot_states.", error.Problem);
    }

    [Fact]
    public void MisspeltKTWithWrongCase_SuggestsKT()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(temperature: "§kt = 0.5"));
        Assert.Contains("Did you mean `kT`?", error.Problem);
    }

    [Fact]
    public void UnknownKeyWithNoCloseMatch_ListsTheKeysWithoutAGuess()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(temperature: "kT = 0.5\n§zzzzzz = 1"));
        Assert.DoesNotContain("Did you mean", error.Problem);
        Assert.Contains("Its keys are kT, kelvin.", error.Problem);
    }

    [Fact]
    public void TableGivenAsValue_IsATypeError()
    {
        var error = _scratch.FailAt("format = 1\nrun = §5\n");
        Assert.Contains("must be a table", error.Problem);
    }

    [Fact]
    public void StringWhereANumberBelongs_SaysExpectedANumber()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = §\"ten\""));
        Assert.Equal("`run.t_end` must be a number (like 2.5 or 1e-3), not a string", error.Problem);
    }

    [Fact]
    public void FloatWhereAWholeNumberBelongs_SaysWholeNumber()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\noutputs = §12.5"));
        Assert.Contains("must be a whole number", error.Problem);
    }

    [Fact]
    public void NumberWhereAStringBelongs_SaysString()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"a\", §2, \"c\"]"));
        Assert.Contains("must be a string in quotes", error.Problem);
    }

    [Fact]
    public void StringWhereABooleanBelongs_SaysTrueOrFalse()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "[initial]\nequilibrium = §\"yes\""));
        Assert.Contains("must be true or false", error.Problem);
    }

    [Fact]
    public void NotANumberInTheDeck_IsRejectedAsNotFinite()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(energies: "values = [0.0, §nan, 2.0]"));
        Assert.Contains("finite", error.Problem);
    }

    [Fact]
    public void MissingFormat_IsReportedForTheDeck()
    {
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(DeckScratch.Valid(top: "title = \"x\"")));
        Assert.Equal(new SourceSpan(_scratch.DeckPath, 1, 1), error.Span);
        Assert.Contains("format = 1", error.Problem);
    }

    [Fact]
    public void OtherFormatVersion_IsRejectedAtTheValue()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(top: "format = §2"));
        Assert.Contains("deck format 1, not 2", error.Problem);
    }

    [Fact]
    public void UnknownEnergyUnit_SuggestsTheRightSpelling()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(units: "energy = \"§ev\""));
        Assert.Contains("Did you mean `eV`?", error.Problem);
    }

    [Fact]
    public void KelvinWithDimensionlessUnits_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(units: "energy = \"none\"", temperature: "kelvin = §300"));
        Assert.Contains("physical energy unit", error.Problem);
    }

    [Fact]
    public void BothKTAndKelvin_AreRejectedAtTheSecond()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(temperature: "kT = 0.5\n§kelvin = 300"));
        Assert.Contains("give only one of kT, kelvin", error.Problem);
    }

    [Fact]
    public void NonPositiveKT_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(temperature: "kT = §-0.5"));
        Assert.Contains("must be > 0", error.Problem);
    }

    [Fact]
    public void ZeroStateCount_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "spacing = \"linear\"\ncount = §0\nfrom = 1.0\nto = 2.0"));
        Assert.Contains("between 1 and", error.Problem);
    }

    [Fact]
    public void FromNotBelowTo_IsRejectedAtTo()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "spacing = \"linear\"\ncount = 3\nfrom = 5.0\nto = §5.0"));
        Assert.Contains("must be larger than `states.from`", error.Problem);
    }

    [Fact]
    public void LogGridFromZero_IsRejectedAtFrom()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "spacing = \"log\"\ncount = 3\nfrom = §0.0\nto = 5.0"));
        Assert.Contains("logarithmic grid needs `states.from` > 0", error.Problem);
    }

    [Fact]
    public void CoordinatesNotIncreasing_AreRejectedAtTheOffendingValue()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, §2.0]\nlabels = [\"a\", \"b\", \"c\"]"));
        Assert.Contains("must increase strictly", error.Problem);
    }

    [Fact]
    public void DuplicateLabel_IsADuplicateState()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"a\", \"b\", \"§a\"]"));
        Assert.Equal("duplicate state `a`: state 1 already has this label", error.Problem);
    }

    [Fact]
    public void PlainNumberLabel_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\nlabels = [\"a\", \"§7\", \"c\"]"));
        Assert.Contains("cannot be a plain number", error.Problem);
    }

    [Fact]
    public void LabelCountMismatch_IsReportedAtTheArray()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\nlabels = §[\"a\", \"b\"]"));
        Assert.Contains("has 2 labels but there are 3 states", error.Problem);
    }

    [Fact]
    public void EnergyCountMismatch_IsReportedAtTheArray()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(energies: "values = §[0.0, 1.0]"));
        Assert.Equal("`energies.values` has 2 values but there are 3 states", error.Problem);
    }

    [Fact]
    public void ExplicitAndGeneratedGridKeys_DoNotMix()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(states: "coordinates = [1.0, 2.0, 3.0]\n§count = 3"));
        Assert.Contains("[states] lists its coordinates", error.Problem);
    }

    [Fact]
    public void ZeroWeight_IsRejectedAtTheValue()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(weights: "values = [1, §0, 5]"));
        Assert.Contains("a weight must be > 0", error.Problem);
    }

    [Fact]
    public void InfiniteWeight_IsRejectedAsNotFinite()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(weights: "values = [1, 3, §inf]"));
        Assert.Contains("finite", error.Problem);
    }

    [Fact]
    public void IsotropicWeightsOnNonPositiveCoordinates_AreRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(
            states: "coordinates = [0.0, 2.0, 3.0]\nlabels = [\"a\", \"b\", \"c\"]",
            weights: "isotropic_dimension = §3"));
        Assert.Contains("coordinates > 0", error.Problem);
    }

    [Fact]
    public void TwoWeightSources_AreRejectedAtTheSecond()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(weights: "values = [1, 3, 5]\n§isotropic_dimension = 3"));
        Assert.Contains("give only one of", error.Problem);
    }

    [Fact]
    public void WeightsFromMechanicsWithoutMechanics_AreRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(weights: "from_mechanics = §true"));
        Assert.Contains("[mechanics]", error.Problem);
    }

    [Fact]
    public void UnknownTransferKind_SuggestsTheClosest()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(transfer: "kind = \"§oneway\"\ndirection = \"toward_smaller\"\ncsv = \"rates.csv\""));
        Assert.Contains("Did you mean `one_way`?", error.Problem);
    }

    [Fact]
    public void BandWithMeasuredRates_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(transfer: "kind = \"one_way\"\ndirection = \"toward_smaller\"\ncsv = \"rates.csv\"\n§band = 1"));
        Assert.Contains("applies to kind = \"kernel\" only", error.Problem);
    }

    [Fact]
    public void OneWayWithoutDirection_IsReportedAtTheTable()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(transfer: "kind = \"one_way\"\ncsv = \"rates.csv\"").Replace("[transfer]", "[§transfer]"));
        Assert.Contains("[transfer] needs `direction`", error.Problem);
    }

    [Fact]
    public void MissingRateFile_IsReportedAtTheFileName()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(transfer: "kind = \"full\"\ncsv = \"§nothere.csv\""));
        Assert.Contains("cannot read the rate file", error.Problem);
    }

    [Fact]
    public void NegativeLoss_IsRejectedAtTheValue()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "[losses]\nvalues = [0.0, §-1.0, 0.0]"));
        Assert.Contains("cannot be negative", error.Problem);
    }

    [Fact]
    public void NegativePumping_IsRejectedAtTheValue()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "[pumping]\nby_state = { b = §-2 }"));
        Assert.Contains("cannot be negative", error.Problem);
    }

    [Fact]
    public void LossForUnknownState_SuggestsALabel()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(
            states: "spacing = \"log\"\ncount = 12\nfrom = 1.0\nto = 100.0\nlabel_prefix = \"k\"",
            energies: "expression = \"x\"",
            weights: "isotropic_dimension = 3",
            transfer: "kind = \"kernel\"\nkernel = \"1\"\ndirection = \"toward_larger\"",
            extra: "[losses]\nby_state = { §k12a = 0.5 }"));
        Assert.Contains("unknown state `k12a`. Did you mean `k12`?", error.Problem);
    }

    [Fact]
    public void InitialStateUnknown_SuggestsALabel()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "[initial]\nstate = \"§bb\""));
        Assert.Contains("Did you mean `b`?", error.Problem);
    }

    [Fact]
    public void InitialStateNumberOutOfRange_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "[initial]\nstate = §4"));
        Assert.Contains("numbered 1..3", error.Problem);
    }

    [Fact]
    public void MissingRunTable_AsksForTEnd()
    {
        var text = DeckScratch.Valid().Replace("[run]\nt_end = 1.0\n", "");
        var error = Assert.Throws<DeckException>(() => _scratch.Parse(text));
        Assert.Equal(new SourceSpan(_scratch.DeckPath, 1, 1), error.Span);
        Assert.Contains("[run] table with `t_end`", error.Problem);
    }

    [Fact]
    public void FirstTimeOnALinearGrid_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\n§t_first = 0.1"));
        Assert.Contains("spacing = \"log\"", error.Problem);
    }

    [Fact]
    public void FirstTimeAfterTheEnd_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\nspacing = \"log\"\nt_first = §2.0"));
        Assert.Contains("must be smaller than `run.t_end`", error.Problem);
    }

    [Fact]
    public void SafetyAboveOne_IsRejected()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\nsafety = §1.5"));
        Assert.Contains("(0, 1]", error.Problem);
    }

    [Fact]
    public void TimeStepWord_MustBeAuto()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\ndt = \"§fast\""));
        Assert.Contains("\"auto\"", error.Problem);
    }

    [Fact]
    public void UnknownExplicitMethod_SuggestsTheClosest()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\nexplicit = \"§eular\""));
        Assert.Contains("Did you mean `euler`?", error.Problem);
    }

    [Fact]
    public void UnknownPlotState_SuggestsALabel()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(run: "t_end = 1.0\nplot_states = [\"a\", \"§cc\"]"));
        Assert.Contains("Did you mean `c`?", error.Problem);
    }

    [Fact]
    public void ParameterNamedLikeAVariable_IsRejectedAtTheKey()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "[parameters]\n§x = 1.0"));
        Assert.Contains("is a variable of the expressions", error.Problem);
    }

    [Fact]
    public void ParameterWithAStringValue_IsATypeError()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(extra: "[parameters]\nalpha = §\"big\""));
        Assert.Contains("`parameters.alpha` must be a number", error.Problem);
    }

    [Fact]
    public void EmptyExpression_IsRejectedInsideTheQuotes()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(energies: "expression = \"§  \""));
        Assert.Contains("is empty", error.Problem);
    }

    [Fact]
    public void MechanicsWithoutPlanckForAnotherTimeUnit_AsksForPlanck()
    {
        var error = _scratch.FailAt(DeckScratch.Valid(units: "energy = \"eV\"\ntime = \"ms\"", extra: "[§mechanics]\nlagrangian = \"0.5*v^2\""));
        Assert.Contains("needs `planck`", error.Problem);
    }
}
