namespace RateDeck.Decks;

/// <summary>
/// Energy unit names and conversions. Every factor is built from the defining constants of the
/// SI, which the CODATA 2018 adjustment lists as exact (https://physics.nist.gov/cuu/Constants/),
/// so the conversions carry only double rounding (relative error about 1e-16).
/// </summary>
public static class EnergyUnits
{
    /// <summary>Elementary charge e in coulombs (exact, CODATA 2018): 1 eV = e joules.</summary>
    public const double ElementaryCharge = 1.602176634e-19;

    /// <summary>Boltzmann constant k_B in J/K (exact, CODATA 2018).</summary>
    public const double Boltzmann = 1.380649e-23;

    /// <summary>Planck constant h in J s (exact, CODATA 2018).</summary>
    public const double Planck = 6.62607015e-34;

    /// <summary>Speed of light in vacuum c in m/s (exact, CODATA 2018).</summary>
    public const double SpeedOfLight = 299792458.0;

    /// <summary>Avogadro constant N_A in 1/mol (exact, CODATA 2018).</summary>
    public const double Avogadro = 6.02214076e23;

    private static readonly (EnergyUnit Unit, string Name)[] _names =
    [
        (EnergyUnit.ElectronVolt, "eV"),
        (EnergyUnit.Kelvin, "K"),
        (EnergyUnit.Wavenumber, "cm-1"),
        (EnergyUnit.Joule, "J"),
        (EnergyUnit.KilojoulePerMole, "kJ/mol"),
        (EnergyUnit.Dimensionless, "none"),
    ];

    /// <summary>The names a deck writes for the units, in the order of <see cref="EnergyUnit"/>.</summary>
    public static IReadOnlyList<string> Names { get; } = _names.Select(n => n.Name).ToArray();

    /// <summary>The deck name of <paramref name="unit"/> (for example <c>cm-1</c>).</summary>
    public static string Name(EnergyUnit unit) => _names.First(n => n.Unit == unit).Name;

    /// <summary>Finds the unit a deck names; the match is exact (<c>eV</c>, not <c>ev</c>).</summary>
    public static bool TryParse(string name, out EnergyUnit unit)
    {
        foreach (var (u, n) in _names)
        {
            if (n == name)
            {
                unit = u;
                return true;
            }
        }

        unit = default;
        return false;
    }

    /// <summary>
    /// Joules in one <paramref name="unit"/>: e for eV, k_B for K, h c (100 m^-1) for cm^-1,
    /// 1000 / N_A for kJ/mol.
    /// </summary>
    /// <exception cref="ArgumentException">For <see cref="EnergyUnit.Dimensionless"/>, which has no joule value.</exception>
    public static double JoulesPerUnit(EnergyUnit unit) => unit switch
    {
        EnergyUnit.ElectronVolt => ElementaryCharge,
        EnergyUnit.Kelvin => Boltzmann,
        EnergyUnit.Wavenumber => Planck * SpeedOfLight * 100.0,
        EnergyUnit.Joule => 1.0,
        EnergyUnit.KilojoulePerMole => 1000.0 / Avogadro,
        EnergyUnit.Dimensionless => throw new ArgumentException("dimensionless model units have no value in joules", nameof(unit)),
        _ => throw new ArgumentOutOfRangeException(nameof(unit)),
    };

    /// <summary>
    /// Converts <paramref name="value"/> from one unit to another. Dimensionless converts only to
    /// itself.
    /// </summary>
    /// <exception cref="ArgumentException">When exactly one of the units is dimensionless.</exception>
    public static double Convert(double value, EnergyUnit from, EnergyUnit to)
    {
        if (from == to)
        {
            return value;
        }

        return value * (JoulesPerUnit(from) / JoulesPerUnit(to));
    }

    /// <summary>kT = k_B T for a temperature in kelvin, expressed in <paramref name="unit"/>.</summary>
    /// <exception cref="ArgumentException">For <see cref="EnergyUnit.Dimensionless"/>.</exception>
    public static double KTFromKelvin(double kelvin, EnergyUnit unit)
        => unit == EnergyUnit.Kelvin ? kelvin : kelvin * Boltzmann / JoulesPerUnit(unit);

    /// <summary>The temperature T = kT / k_B in kelvin of a kT given in <paramref name="unit"/>; null for <see cref="EnergyUnit.Dimensionless"/>, which has no kelvin.</summary>
    public static double? KelvinFromKT(double kT, EnergyUnit unit) => unit switch
    {
        EnergyUnit.Dimensionless => null,
        EnergyUnit.Kelvin => kT,
        _ => kT * JoulesPerUnit(unit) / Boltzmann,
    };

    /// <summary>Planck's constant h in <paramref name="unit"/> times seconds.</summary>
    /// <exception cref="ArgumentException">For <see cref="EnergyUnit.Dimensionless"/>.</exception>
    public static double PlanckIn(EnergyUnit unit) => Planck / JoulesPerUnit(unit);
}
