using System.Text.Json;
using RateDeck.Decks;
using Xunit;

namespace RateDeck.Tests.Decks;

/// <summary>
/// Unit conversions against CODATA 2018: the published energy-equivalence relationships (NIST,
/// https://physics.nist.gov/cuu/Constants/, 2018 adjustment; values typed from that table) and
/// the factors computed by SciPy's scipy.constants (CODATA 2018) in
/// tests/reference/energy_units.py, whose fixture records the SciPy version.
/// </summary>
public sealed class EnergyUnitsTests
{
    private static readonly JsonElement _fixture = JsonDocument.Parse(
        File.ReadAllText(Path.Combine(AppContext.BaseDirectory, "fixtures", "energy-units.json"))).RootElement;

    [Fact]
    public void ElectronVolt_InWavenumbers_MatchesCodata2018()
    {
        // CODATA 2018: 1 eV = 8.065 543 937... x 10^5 m^-1 (exact digits of the relationship).
        Assert.Equal(8065.543937, EnergyUnits.Convert(1.0, EnergyUnit.ElectronVolt, EnergyUnit.Wavenumber), 1e-6);
    }

    [Fact]
    public void ElectronVolt_InKelvin_MatchesCodata2018()
    {
        // CODATA 2018: 1 eV = 1.160 451 812... x 10^4 K.
        Assert.Equal(11604.51812, EnergyUnits.Convert(1.0, EnergyUnit.ElectronVolt, EnergyUnit.Kelvin), 1e-5);
    }

    [Fact]
    public void KilojoulePerMole_InWavenumbers_MatchesCodata2018()
    {
        // From CODATA 2018: F = N_A e = 96 485.332 12 C/mol, so 1 eV = 96.485 332 12 kJ/mol and
        // 1 kJ/mol = 8065.543937 / 96.48533212 cm^-1 = 83.593 4722... cm^-1.
        Assert.Equal(83.5934722, EnergyUnits.Convert(1.0, EnergyUnit.KilojoulePerMole, EnergyUnit.Wavenumber), 1e-7);
        Assert.Equal(96.48533212, EnergyUnits.Convert(1.0, EnergyUnit.ElectronVolt, EnergyUnit.KilojoulePerMole), 1e-8);
    }

    [Fact]
    public void Wavenumber_InKelvin_IsTheSecondRadiationConstant()
    {
        // CODATA 2018: c2 = h c / k = 1.438 776 877... x 10^-2 m K, i.e. 1 cm^-1 = 1.438776877 K.
        Assert.Equal(1.438776877, EnergyUnits.Convert(1.0, EnergyUnit.Wavenumber, EnergyUnit.Kelvin), 1e-9);
    }

    [Fact]
    public void JoulesPerUnit_MatchScipyCodata2018()
    {
        // Reference: scipy.constants (CODATA 2018), fixture written by tests/reference/energy_units.py.
        var expected = _fixture.GetProperty("joules_per_unit");
        foreach (var name in new[] { "eV", "K", "cm-1", "J", "kJ/mol" })
        {
            Assert.True(EnergyUnits.TryParse(name, out var unit));
            var reference = expected.GetProperty(name).GetDouble();
            // The table gives h c to 10 significant digits, hence the tolerance.
            Assert.Equal(1.0, EnergyUnits.JoulesPerUnit(unit) / reference, 1e-9);
        }
    }

    [Fact]
    public void PublishedRelationships_MatchScipyCodata2018()
    {
        // Reference: scipy.constants relationships (CODATA 2018), same fixture.
        Assert.Equal(1.0, EnergyUnits.Convert(1.0, EnergyUnit.ElectronVolt, EnergyUnit.Kelvin) / _fixture.GetProperty("electron_volt_kelvin").GetDouble(), 1e-9);
        Assert.Equal(1.0, EnergyUnits.Convert(1.0, EnergyUnit.ElectronVolt, EnergyUnit.Wavenumber) * 100.0 / _fixture.GetProperty("electron_volt_inverse_meter").GetDouble(), 1e-9);
        Assert.Equal(1.0, EnergyUnits.PlanckIn(EnergyUnit.ElectronVolt) / _fixture.GetProperty("planck_eV_s").GetDouble(), 1e-9);
    }

    [Fact]
    public void KTFromKelvin_IsBoltzmannTimesTemperatureInTheUnit()
    {
        // 300 K: kT = 300 / 11604.51812 eV = 0.025852 eV (CODATA 2018 eV-K relationship) and
        // 300 / 1.438776877 cm^-1 = 208.5098 cm^-1 (second radiation constant).
        Assert.Equal(300.0 / 11604.51812, EnergyUnits.KTFromKelvin(300.0, EnergyUnit.ElectronVolt), 1e-11);
        Assert.Equal(300.0 / 1.438776877, EnergyUnits.KTFromKelvin(300.0, EnergyUnit.Wavenumber), 1e-6);
        Assert.Equal(300.0, EnergyUnits.KTFromKelvin(300.0, EnergyUnit.Kelvin));
    }

    [Fact]
    public void Dimensionless_ConvertsOnlyToItself()
    {
        Assert.Equal(2.5, EnergyUnits.Convert(2.5, EnergyUnit.Dimensionless, EnergyUnit.Dimensionless));
        Assert.Throws<ArgumentException>(() => EnergyUnits.Convert(1.0, EnergyUnit.Dimensionless, EnergyUnit.ElectronVolt));
    }

    [Fact]
    public void UnitNames_RoundTrip()
    {
        foreach (var unit in Enum.GetValues<EnergyUnit>())
        {
            Assert.True(EnergyUnits.TryParse(EnergyUnits.Name(unit), out var parsed));
            Assert.Equal(unit, parsed);
        }

        Assert.False(EnergyUnits.TryParse("ev", out _));
    }
}
