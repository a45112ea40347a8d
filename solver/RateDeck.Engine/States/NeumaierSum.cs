namespace RateDeck.States;

/// <summary>
/// Compensated summation (Neumaier, ZAMM 54 (1974) 39, the improved Kahan-Babuska scheme): the
/// error of the sum stays near one rounding of the result whatever the order and signs of the
/// terms, so a generator column built from rates of very different sizes still conserves to rounding.
/// </summary>
internal struct NeumaierSum
{
    private double _sum;
    private double _compensation;

    /// <summary>Adds one term.</summary>
    public void Add(double term)
    {
        var t = _sum + term;
        _compensation += Math.Abs(_sum) >= Math.Abs(term) ? (_sum - t) + term : (term - t) + _sum;
        _sum = t;
    }

    /// <summary>The compensated sum of the terms added so far.</summary>
    public readonly double Value => _sum + _compensation;
}
