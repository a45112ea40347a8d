using RateDeck.Mechanics;

namespace RateDeck.States;

/// <summary>
/// The last few mechanics results of one deck file, keyed by everything a result depends on: the
/// Lagrangian's text, h, the values of the inputs the Lagrangian reads (kT only when it reads kT)
/// and the state energies. A fit that varies kT, rates or populations reuses one result for every
/// trial; one that varies a parameter of the Lagrangian keeps only the most recent few.
/// </summary>
internal sealed class MechanicsMemo
{
    /// <summary>How many results are kept: enough for a few interleaved trial points, small beside N^2 work.</summary>
    private const int _capacity = 4;

    private readonly LinkedList<(MechanicsKey Key, MechanicsResult Result)> _recent = new();
    private int _derivations;

    /// <summary>How many results were derived (not found kept): a fit reports it to show the mechanics is not derived per trial.</summary>
    public int Derivations => _derivations;

    /// <summary>The result for <paramref name="key"/>, derived by <paramref name="derive"/> when not kept.</summary>
    public MechanicsResult GetOrDerive(MechanicsKey key, Func<MechanicsResult> derive)
    {
        lock (_recent)
        {
            foreach (var entry in _recent)
            {
                if (entry.Key.Equals(key))
                {
                    return entry.Result;
                }
            }
        }

        var result = derive();
        Interlocked.Increment(ref _derivations);
        lock (_recent)
        {
            _recent.AddFirst((key, result));
            if (_recent.Count > _capacity)
            {
                _recent.RemoveLast();
            }
        }

        return result;
    }
}

/// <summary>What a mechanics result depends on; equal when every number is equal bit for bit.</summary>
internal sealed class MechanicsKey(string lagrangian, double planck, double[] inputs, double[] energies) : IEquatable<MechanicsKey>
{
    public bool Equals(MechanicsKey? other)
        => other is not null
            && other.Lagrangian == Lagrangian
            && other.Planck.Equals(Planck)
            && other.Inputs.AsSpan().SequenceEqual(Inputs)
            && other.Energies.AsSpan().SequenceEqual(Energies);

    public override bool Equals(object? obj) => Equals(obj as MechanicsKey);

    public override int GetHashCode() => HashCode.Combine(Lagrangian, Planck, Energies.Length);

    private string Lagrangian { get; } = lagrangian;

    private double Planck { get; } = planck;

    private double[] Inputs { get; } = inputs;

    private double[] Energies { get; } = energies;
}
