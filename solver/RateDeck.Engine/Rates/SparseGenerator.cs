using MathNet.Numerics.LinearAlgebra.Double;

namespace RateDeck.Rates;

/// <summary>
/// K in compressed sparse columns, diagonal included: column j holds the rows
/// <c>RowIndices[ColumnStarts[j] .. ColumnStarts[j + 1])</c>, ascending, with their
/// <see cref="Values"/>. Columns, because the rates out of a state are a column of K (its sum
/// gives the diagonal, its rows the successors in the transition graph). Built for banded decks
/// (nearest neighbours and the like), where it holds O(N band) numbers instead of N^2.
/// </summary>
public sealed class SparseGenerator
{
    /// <summary>Wraps compressed columns; rows must ascend within each column and lie in 0..N-1.</summary>
    /// <exception cref="ArgumentException">The arrays are inconsistent.</exception>
    public SparseGenerator(int count, int[] columnStarts, int[] rowIndices, double[] values)
    {
        ArgumentNullException.ThrowIfNull(columnStarts);
        ArgumentNullException.ThrowIfNull(rowIndices);
        ArgumentNullException.ThrowIfNull(values);
        if (columnStarts.Length != count + 1 || columnStarts[0] != 0 || columnStarts[count] != rowIndices.Length || rowIndices.Length != values.Length)
        {
            throw new ArgumentException("the compressed columns are inconsistent: need N + 1 column starts from 0 to the entry count, one row per value", nameof(columnStarts));
        }

        var bandwidth = 0;
        for (var j = 0; j < count; j++)
        {
            for (var p = columnStarts[j]; p < columnStarts[j + 1]; p++)
            {
                var row = rowIndices[p];
                if (row < 0 || row >= count || (p > columnStarts[j] && row <= rowIndices[p - 1]))
                {
                    throw new ArgumentException($"column {j}: rows must lie in 0..{count - 1} and ascend", nameof(rowIndices));
                }

                bandwidth = Math.Max(bandwidth, Math.Abs(row - j));
            }
        }

        Count = count;
        ColumnStarts = columnStarts;
        RowIndices = rowIndices;
        Values = values;
        Bandwidth = bandwidth;
    }

    /// <summary>Number of states N.</summary>
    public int Count { get; }

    /// <summary>Start of each column in <see cref="RowIndices"/> and <see cref="Values"/>; N + 1 entries.</summary>
    public int[] ColumnStarts { get; }

    /// <summary>Row of each stored entry, ascending within a column.</summary>
    public int[] RowIndices { get; }

    /// <summary>Value of each stored entry.</summary>
    public double[] Values { get; }

    /// <summary>Number of stored entries (diagonal included).</summary>
    public int StoredCount => Values.Length;

    /// <summary>max |i - j| over the stored entries: 1 for nearest neighbours.</summary>
    public int Bandwidth { get; }

    /// <summary>K_ij (zero when not stored), by binary search in column j.</summary>
    public double this[int row, int column]
    {
        get
        {
            var p = Array.BinarySearch(RowIndices, ColumnStarts[column], ColumnStarts[column + 1] - ColumnStarts[column], row);
            return p >= 0 ? Values[p] : 0.0;
        }
    }

    /// <summary>y += K x, O(stored entries).</summary>
    public void MultiplyAdd(ReadOnlySpan<double> x, Span<double> y)
    {
        for (var j = 0; j < Count; j++)
        {
            var xj = x[j];
            if (xj == 0)
            {
                continue;
            }

            for (var p = ColumnStarts[j]; p < ColumnStarts[j + 1]; p++)
            {
                y[RowIndices[p]] += Values[p] * xj;
            }
        }
    }

    /// <summary>The dense N x N matrix (N^2 doubles: mind the size).</summary>
    public DenseMatrix ToDense()
    {
        var dense = DenseMatrix.Create(Count, Count, 0.0);
        var storage = dense.Values;
        for (var j = 0; j < Count; j++)
        {
            for (var p = ColumnStarts[j]; p < ColumnStarts[j + 1]; p++)
            {
                storage[((long)j * Count) + RowIndices[p]] = Values[p];
            }
        }

        return dense;
    }
}
