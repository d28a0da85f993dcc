namespace SignalInspect.Dsp;

/// <summary>
/// Combines partial results strictly in the order of their indices although threads finish them
/// in any order, and recycles their buffers: sums of doubles depend on their order, so combining
/// this way makes a parallel pass give the same bits for any thread count. Thread-safe.
/// </summary>
/// <param name="create">Makes a new, empty partial result.</param>
/// <param name="take">Adds a partial result into the total and leaves it empty for reuse.</param>
public sealed class InOrder<T>(Func<T> create, Action<T> take)
    where T : class
{
    private readonly Dictionary<int, T> _pending = [];
    private readonly Stack<T> _free = new();
    private int _next;

    /// <summary>An empty partial result (recycled when one is free).</summary>
    public T Rent()
    {
        lock (_pending)
            return _free.Count > 0 ? _free.Pop() : create();
    }

    /// <summary>Hands in the partial result of <paramref name="index"/>; every result whose turn has come is taken into
    /// the total.</summary>
    public void Complete(int index, T part)
    {
        lock (_pending)
        {
            _pending[index] = part;
            while (_pending.Remove(_next, out T? ready))
            {
                take(ready);
                _free.Push(ready);
                _next++;
            }
        }
    }
}
