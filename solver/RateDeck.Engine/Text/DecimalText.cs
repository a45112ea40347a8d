using System.Numerics;
using System.Runtime.CompilerServices;

namespace RateDeck.Text;

/// <summary>
/// Plain decimal numbers (<c>digits[.digits][e[+|-]digits]</c>, ASCII) to the nearest double,
/// fast: the .NET parser takes about half a microsecond for the 17 significant digits that a
/// round-trip writer emits, which for a rate file of millions of rows is most of reading it.
/// </summary>
/// <remarks>
/// The algorithm of Eisel and Lemire (D. Lemire, "Number parsing at a gigabyte per second",
/// Software: Practice and Experience 51(8), 2021), in the form with one 128-bit power of ten
/// rounded down per decimal exponent: the significand (at most 19 digits, exact in 64 bits) times
/// that power gives the binary significand, and a result is returned only when the truncation of
/// the power and of the product cannot change the rounded double. Otherwise, and for any text
/// outside the plain form (a sign, more than 19 significant digits, a subnormal or overflowing
/// result, a letter), <see cref="double.TryParse(ReadOnlySpan{char}, System.Globalization.NumberStyles, IFormatProvider?, out double)"/>
/// with invariant culture decides, so every text gets the double that parser gives it.
/// </remarks>
internal static class DecimalText
{
    private const int _smallestExponent = -348;
    private const int _largestExponent = 347;

    /// <summary>Exponents beyond this many digits go to the .NET parser (they are out of range anyway).</summary>
    private const int _exponentDigits = 5;

    // 10^q as a 128-bit significand rounded down: (High, Low) with the top bit of High set.
    private static readonly (ulong High, ulong Low)[] _powersOfTen = PowersOfTen();

    /// <summary>
    /// The double nearest the plain decimal <paramref name="text"/> (ties to even), when the fast
    /// path can decide it; false when the text is not plain or the fast path cannot decide, and the
    /// caller asks the .NET parser.
    /// </summary>
    [MethodImpl(MethodImplOptions.AggressiveOptimization)]
    public static bool TryParsePlain(ReadOnlySpan<byte> text, out double value)
    {
        value = 0;
        var (significand, digits, k) = (0UL, 0, 0);
        while (k < text.Length && IsDigit(text[k]))
        {
            Accumulate(text[k++], ref significand, ref digits);
        }

        if (k == 0)
        {
            return false;
        }

        var exponent = 0;
        if (k < text.Length && text[k] == (byte)'.')
        {
            var first = ++k;
            while (k < text.Length && IsDigit(text[k]))
            {
                Accumulate(text[k++], ref significand, ref digits);
            }

            if (k == first)
            {
                return false;
            }

            exponent = first - k;
        }

        if (k < text.Length && (text[k] | 0x20) == (byte)'e')
        {
            k++;
            var negative = k < text.Length && text[k] == (byte)'-';
            if (k < text.Length && text[k] is (byte)'-' or (byte)'+')
            {
                k++;
            }

            var first = k;
            var written = 0;
            while (k < text.Length && IsDigit(text[k]) && k - first < _exponentDigits)
            {
                written = (written * 10) + (text[k++] - '0');
            }

            if (k == first)
            {
                return false;
            }

            exponent += negative ? -written : written;
        }

        // 19 significant digits fit in 64 bits; more (counted from the first non-zero one) do not.
        return k == text.Length && digits <= 19 && TryEiselLemire(significand, exponent, out value);
    }

    private static bool IsDigit(byte b) => (uint)(b - '0') <= 9;

    /// <summary>Appends a digit; leading zeros do not count toward the significant digits.</summary>
    private static void Accumulate(byte digit, ref ulong significand, ref int digits)
    {
        if (digits > 0 || digit != (byte)'0')
        {
            digits++;
            significand = unchecked((significand * 10) + (ulong)(digit - '0'));
        }
    }

    /// <summary>
    /// significand x 10^exponent rounded to the nearest double, or false when it cannot be decided
    /// from the 128-bit power (or lies outside the normal doubles).
    /// </summary>
    private static bool TryEiselLemire(ulong significand, int exponent, out double value)
    {
        value = 0;
        if (significand == 0)
        {
            return true;
        }

        if (exponent < _smallestExponent || exponent > _largestExponent)
        {
            return false;
        }

        // floor(log2(10^q)) = (217706 q) >> 16 over this range of q.
        var shift = BitOperations.LeadingZeroCount(significand);
        var normalized = significand << shift;
        var binaryExponent = (ulong)(((217706 * exponent) >> 16) + 64 + 1023) - (ulong)shift;
        var (high, low) = _powersOfTen[exponent - _smallestExponent];
        var productHigh = Math.BigMul(normalized, high, out var productLow);

        // The dropped part of the product is below `normalized` in units of productLow: it can
        // carry into the kept bits only when the bits below them are all ones.
        if ((productHigh & 0x1FF) == 0x1FF && productLow + normalized < normalized)
        {
            var lowerHigh = Math.BigMul(normalized, low, out var lowerLow);
            var mergedLow = productLow + lowerHigh;
            var mergedHigh = productHigh + (mergedLow < productLow ? 1UL : 0UL);
            if ((mergedHigh & 0x1FF) == 0x1FF && mergedLow == ulong.MaxValue && lowerLow + normalized < normalized)
            {
                return false;
            }

            (productHigh, productLow) = (mergedHigh, mergedLow);
        }

        // Keep 54 bits: the 53 of a double and one to round with.
        var top = (int)(productHigh >> 63);
        var mantissa = productHigh >> (top + 9);
        binaryExponent -= (ulong)(1 ^ top);

        // Exactly half way on the truncated product: ties to even cannot be told from just above.
        if (productLow == 0 && (productHigh & 0x1FF) == 0 && (mantissa & 3) == 1)
        {
            return false;
        }

        mantissa += mantissa & 1;
        mantissa >>= 1;
        if (mantissa >> 53 > 0)
        {
            mantissa >>= 1;
            binaryExponent++;
        }

        // Subnormal (exponent 0 or below, wrapped) or infinite (0x7FF and above).
        if (binaryExponent - 1 >= 0x7FF - 1)
        {
            return false;
        }

        value = BitConverter.UInt64BitsToDouble((binaryExponent << 52) | (mantissa & 0x000F_FFFF_FFFF_FFFF));
        return true;
    }

    /// <summary>10^q for q from <see cref="_smallestExponent"/> to <see cref="_largestExponent"/>, as 128-bit significands rounded down.</summary>
    private static (ulong High, ulong Low)[] PowersOfTen()
    {
        var table = new (ulong, ulong)[_largestExponent - _smallestExponent + 1];
        var mask = (BigInteger.One << 64) - 1;
        var power = BigInteger.One;
        for (var q = 0; q <= Math.Max(-_smallestExponent, _largestExponent); q++)
        {
            var bits = (int)power.GetBitLength();
            if (q <= _largestExponent)
            {
                var up = bits > 128 ? power >> (bits - 128) : power << (128 - bits);
                table[q - _smallestExponent] = ((ulong)(up >> 64), (ulong)(up & mask));
            }

            if (q > 0 && -q >= _smallestExponent)
            {
                // floor(2^(bits + 127) / 10^q) lies in (2^127, 2^128): 10^q is no power of two.
                var down = (BigInteger.One << (bits + 127)) / power;
                table[-q - _smallestExponent] = ((ulong)(down >> 64), (ulong)(down & mask));
            }

            power *= 10;
        }

        return table;
    }
}
