namespace ForecastHub.Api.Hosting;

/// <summary>Work handed to a background worker and not yet finished; <see cref="WhenIdleAsync"/> completes when none is left.
/// Each <see cref="Added"/> is matched by one <see cref="Finished"/>, whatever came of the work.</summary>
public sealed class PendingWork
{
    private readonly Lock gate = new();
    private int unfinished;
    private TaskCompletionSource idle = Completed();

    public void Added()
    {
        lock (gate)
        {
            if (unfinished++ == 0)
            {
                idle = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
            }
        }
    }

    public void Finished()
    {
        lock (gate)
        {
            if (--unfinished == 0)
            {
                idle.TrySetResult();
            }
        }
    }

    /// <summary>Completes when everything added so far (and anything added meanwhile) is finished.</summary>
    public Task WhenIdleAsync()
    {
        lock (gate)
        {
            return idle.Task;
        }
    }

    private static TaskCompletionSource Completed()
    {
        var done = new TaskCompletionSource(TaskCreationOptions.RunContinuationsAsynchronously);
        done.SetResult();
        return done;
    }
}
