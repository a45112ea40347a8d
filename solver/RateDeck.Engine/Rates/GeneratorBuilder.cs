using System.Globalization;
using MathNet.Numerics.LinearAlgebra.Double;
using RateDeck.Decks;
using RateDeck.States;

namespace RateDeck.Rates;

/// <summary>
/// Where the assembler writes K: a dense N x N array, or, for a banded deck, a band of 2b + 1
/// diagonals that becomes a <see cref="SparseGenerator"/>. The rule: sparse when the coupling is
/// banded (a kernel with <c>band</c>, or one-way measured rates all within a band), N is at least
/// <see cref="SparseMinimumStates"/>, b is at most <see cref="SparseMaximumBand"/> and the band
/// holds at most 1/16 of the dense entries. Below that, dense storage costs little and every
/// dense algorithm stays available.
/// </summary>
internal abstract class GeneratorBuilder
{
    /// <summary>Smaller decks are always dense.</summary>
    public const int SparseMinimumStates = 1000;

    /// <summary>Wider bands are always dense: the banded solvers cost O(N b^2).</summary>
    public const int SparseMaximumBand = 64;

    /// <summary>The storage for <paramref name="coupling"/> on <paramref name="n"/> states, with the reason for it.</summary>
    public static (GeneratorBuilder Builder, string Reason) For(CouplingSpec coupling, int n)
    {
        int? band = coupling switch
        {
            KernelModel kernel => kernel.Band,
            MeasuredOneWay oneWay => oneWay.Entries.Count == 0 ? null : WidestPair(oneWay.Entries),
            _ => null,
        };
        if (band is not { } b || b < 1 || n < SparseMinimumStates || b > SparseMaximumBand || (2L * b + 1) * 16 > n)
        {
            return (new Dense(n), "dense");
        }

        var reason = string.Create(
            CultureInfo.InvariantCulture,
            $"sparse: the coupling is banded (|i - j| <= {b}), so K has at most {2 * b + 1} entries per column instead of {n}");
        return (new Band(n, b), reason);
    }

    /// <summary>max |from - to| over the rows.</summary>
    private static int WidestPair(IReadOnlyList<RateEntry> entries)
    {
        var (from, to, _, count) = RateEntryTable.Columns(entries);
        var widest = 0;
        for (var k = 0; k < count; k++)
        {
            widest = Math.Max(widest, Math.Abs(from[k] - to[k]));
        }

        return widest;
    }

    /// <summary>Sets K[row, column] (a later write replaces an earlier one).</summary>
    public abstract void Set(int row, int column, double value);

    /// <summary>Compensated sum of the off-diagonal entries of <paramref name="column"/>, plus <paramref name="loss"/>.</summary>
    public abstract double OutflowOf(int column, double loss);

    /// <summary>The finished rate matrix, its rates per <paramref name="timeUnit"/>.</summary>
    public abstract RateMatrix Build(StateSpace states, double[] loss, double[] pumping, BalanceOrigin origin, string storageReason, string timeUnit);

    private sealed class Dense(int n) : GeneratorBuilder
    {
        private readonly DenseMatrix _matrix = DenseMatrix.Create(n, n, 0.0);

        public override void Set(int row, int column, double value) => _matrix.Values[((long)column * n) + row] = value;

        public override double OutflowOf(int column, double loss)
        {
            var storage = _matrix.Values;
            var sum = new NeumaierSum();
            var offset = (long)column * n;
            for (var row = 0; row < n; row++)
            {
                if (row != column)
                {
                    sum.Add(storage[offset + row]);
                }
            }

            sum.Add(loss);
            return sum.Value;
        }

        public override RateMatrix Build(StateSpace states, double[] loss, double[] pumping, BalanceOrigin origin, string storageReason, string timeUnit) =>
            new(states, _matrix, loss, pumping, origin) { TimeUnit = timeUnit };
    }

    /// <summary>Column j keeps rows j - b .. j + b at [j (2b + 1) + (i - j + b)].</summary>
    private sealed class Band(int n, int band) : GeneratorBuilder
    {
        private readonly int _width = (2 * band) + 1;
        private readonly double[] _band = new double[n * ((2 * band) + 1)];

        public override void Set(int row, int column, double value)
        {
            var offset = row - column + band;
            if (offset < 0 || offset >= _width)
            {
                throw new InvalidOperationException($"entry ({row}, {column}) lies outside the band {band}: the band was measured wrongly");
            }

            _band[(column * _width) + offset] = value;
        }

        public override double OutflowOf(int column, double loss)
        {
            var sum = new NeumaierSum();
            for (var offset = 0; offset < _width; offset++)
            {
                if (offset != band)
                {
                    sum.Add(_band[(column * _width) + offset]);
                }
            }

            sum.Add(loss);
            return sum.Value;
        }

        public override RateMatrix Build(StateSpace states, double[] loss, double[] pumping, BalanceOrigin origin, string storageReason, string timeUnit)
        {
            var starts = new int[n + 1];
            var rows = new List<int>(_band.Length);
            var values = new List<double>(_band.Length);
            for (var column = 0; column < n; column++)
            {
                for (var row = Math.Max(0, column - band); row <= Math.Min(n - 1, column + band); row++)
                {
                    var value = _band[(column * _width) + row - column + band];
                    if (value != 0 || row == column)
                    {
                        rows.Add(row);
                        values.Add(value);
                    }
                }

                starts[column + 1] = rows.Count;
            }

            var sparse = new SparseGenerator(n, starts, [.. rows], [.. values]);
            return new RateMatrix(states, sparse, loss, pumping, origin, storageReason) { TimeUnit = timeUnit };
        }
    }
}
