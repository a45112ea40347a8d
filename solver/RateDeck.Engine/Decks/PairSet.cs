namespace RateDeck.Decks;

/// <summary>A set of ordered state pairs, one bit each (N^2 / 8 bytes): 2 MB at N = 4000.</summary>
internal sealed class PairSet(int n)
{
    private readonly ulong[] _bits = new ulong[(((long)n * n) + 63) / 64];

    /// <summary>Adds (from, to); false when it was there already.</summary>
    public bool Add(int from, int to)
    {
        var index = ((long)from * n) + to;
        var mask = 1UL << (int)(index & 63);
        ref var word = ref _bits[index >> 6];
        if ((word & mask) != 0)
        {
            return false;
        }

        word |= mask;
        return true;
    }
}
