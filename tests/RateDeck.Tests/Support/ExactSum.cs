using System.Numerics;

namespace RateDeck.Tests.Support;

/// <summary>
/// The exact sum of doubles, rounded once at the end: every double is an integer multiple of
/// 2^-1074, so the sum is an exact big integer in that unit. An independent yardstick for the
/// compensated sums of the code under test.
/// </summary>
internal static class ExactSum
{
    public static double Of(IEnumerable<double> terms)
    {
        var total = BigInteger.Zero;
        foreach (var term in terms)
        {
            total += InUnitsOfSmallestSubnormal(term);
        }

        var sign = total.Sign;
        var magnitude = BigInteger.Abs(total);
        var shift = Math.Max(0, (int)magnitude.GetBitLength() - 1000);
        return sign * Math.ScaleB((double)(magnitude >> shift), shift - 1074);
    }

    private static BigInteger InUnitsOfSmallestSubnormal(double value)
    {
        if (!double.IsFinite(value))
        {
            throw new ArgumentException("only finite terms have an exact sum", nameof(value));
        }

        var bits = BitConverter.DoubleToInt64Bits(value);
        var exponent = (int)((bits >> 52) & 0x7FF);
        var mantissa = bits & ((1L << 52) - 1);
        var units = exponent == 0 ? new BigInteger(mantissa) : new BigInteger(mantissa | (1L << 52)) << (exponent - 1);
        return value < 0 ? -units : units;
    }
}
