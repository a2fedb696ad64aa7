using System.Runtime.ExceptionServices;

namespace ForecastHub.Core.Series;

/// <summary>Runs two independent steps of a fit at once, on two cores where there are two.</summary>
internal static class SideBySide
{
    /// <summary>Runs both; the caller sees a step's problem (too few points, say) as when they ran one after the other.</summary>
    public static void Run(Action first, Action second)
    {
        try
        {
            Parallel.Invoke(first, second);
        }
        catch (AggregateException error)
        {
            ExceptionDispatchInfo.Throw(error.InnerExceptions.FirstOrDefault(e => e is SeriesException) ?? error.InnerExceptions[0]);
        }
    }
}
