namespace RateDeck.LinearAlgebra;

/// <summary>How large a dense N x N array the engine agrees to form (one home for the limit).</summary>
public static class DenseStorage
{
    /// <summary>Largest N whose dense form is built on request: 12,000 states are 1.15 GB of doubles.</summary>
    public const int StateLimit = 12_000;
}

/// <summary>A stage asked for a dense array larger than <see cref="DenseStorage.StateLimit"/> allows; the message says what to do.</summary>
public sealed class DenseStorageException : InvalidOperationException
{
    /// <summary>Creates the exception with a plain message.</summary>
    public DenseStorageException(string message) : base(message) { }
}
