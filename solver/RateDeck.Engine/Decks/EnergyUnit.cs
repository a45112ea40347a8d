namespace RateDeck.Decks;

/// <summary>
/// The energy units a deck may use. Conversion factors to joules are CODATA 2018 exact or
/// recommended values (https://physics.nist.gov/cuu/Constants/, 2018 adjustment).
/// </summary>
public enum EnergyUnit
{
    /// <summary>Electronvolt.</summary>
    ElectronVolt,
    /// <summary>Kelvin (energy expressed as E / k_B).</summary>
    Kelvin,
    /// <summary>Wavenumber, cm^-1 (energy expressed as E / (h c)).</summary>
    Wavenumber,
    /// <summary>Joule.</summary>
    Joule,
    /// <summary>Kilojoule per mole.</summary>
    KilojoulePerMole,
    /// <summary>Dimensionless model units: no conversion is possible or needed.</summary>
    Dimensionless,
}
