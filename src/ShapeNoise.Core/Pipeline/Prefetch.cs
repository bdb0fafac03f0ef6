using System.Collections.Concurrent;
using System.Runtime.ExceptionServices;

namespace ShapeNoise.Pipeline;

/// <summary>Runs a producer ahead of its consumer: the frames of a movie are decoded, scanned and traced on one thread
/// while the previous frames are measured on another (bench/README.md), with the items handed over in order.</summary>
internal static class Prefetch
{
    /// <summary>Enumerates <paramref name="source"/> on a background task, at most <paramref name="capacity"/> items ahead of
    /// the consumer, in order. An exception of the producer is rethrown to the consumer as it was thrown (same type, same
    /// stack); when the consumer stops early the producer is cancelled and awaited before this returns.</summary>
    public static IEnumerable<T> Ahead<T>(IEnumerable<T> source, int capacity)
    {
        using var queue = new BlockingCollection<T>(capacity);
        using var stop = new CancellationTokenSource();
        ExceptionDispatchInfo? error = null;
        var producer = Task.Run(() =>
        {
            try { foreach (var item in source) queue.Add(item, stop.Token); }
            catch (OperationCanceledException) when (stop.IsCancellationRequested) { }
            catch (Exception e) { error = ExceptionDispatchInfo.Capture(e); }
            finally { queue.CompleteAdding(); }
        });
        try
        {
            foreach (var item in queue.GetConsumingEnumerable()) yield return item;
            producer.Wait();
            error?.Throw();
        }
        finally
        {
            stop.Cancel();
            producer.Wait();
        }
    }
}
