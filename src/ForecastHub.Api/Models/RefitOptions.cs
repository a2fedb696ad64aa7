namespace ForecastHub.Api.Models;

/// <summary>Configuration section <c>Refit</c>: when the background service refits a site.</summary>
public sealed class RefitOptions
{
    public const string SectionName = "Refit";

    /// <summary>False: this node runs no background fits or sweeps (a node that only ingests and serves, or a benchmark timing ingest alone).</summary>
    public bool Enabled { get; set; } = true;

    /// <summary>Fits running at once; each fit is single-threaded work.</summary>
    public int MaxConcurrency { get; set; } = Math.Max(1, Environment.ProcessorCount);

    /// <summary>Refit an hourly site after this many new grid points (one day).</summary>
    public int NewPointsHourly { get; set; } = 24;

    /// <summary>Refit a daily site after this many new grid points.</summary>
    public int NewPointsDaily { get; set; } = 3;

    /// <summary>Refit a model older than this once any new grid point has arrived.</summary>
    public TimeSpan ModelMaxAge { get; set; } = TimeSpan.FromDays(3);

    /// <summary>How often every site is checked (model age, day-ahead archive, live scores).</summary>
    public TimeSpan SweepInterval { get; set; } = TimeSpan.FromHours(1);

    /// <summary>How far past the data end of the fit that built a site's calibration table later refits may keep that table
    /// (Calibration.CanCarry); zero rebuilds it at every refit.</summary>
    public TimeSpan CalibrationCarry { get; set; } = Core.Modeling.Calibration.DefaultCarryLimit;

    /// <summary>Parsed models kept in memory; beyond this an arbitrary one is dropped and read again from storage when next used.</summary>
    public int MaxLoadedModels { get; set; } = 500;

    /// <summary>Memory for the rows of recently fitted windows (WindowRowCache), so a refit after new readings reads only the newer
    /// rows; 32 MiB holds about eleven ten-year hourly windows. Zero turns the cache off; it is always off on PostgreSQL.</summary>
    public int WindowCacheMegabytes { get; set; } = 32;

    /// <summary>Throws naming the first setting out of range; called at start.</summary>
    public void Validate()
    {
        if (MaxConcurrency is < 1 or > 64)
        {
            throw new ArgumentException("Refit:MaxConcurrency must be between 1 and 64.", nameof(MaxConcurrency));
        }

        if (NewPointsHourly < 1 || NewPointsDaily < 1)
        {
            throw new ArgumentException("Refit:NewPointsHourly and Refit:NewPointsDaily must be at least 1.", nameof(NewPointsHourly));
        }

        if (MaxLoadedModels is < 1 or > 1_000_000)
        {
            throw new ArgumentException("Refit:MaxLoadedModels must be between 1 and 1000000.", nameof(MaxLoadedModels));
        }

        if (CalibrationCarry < TimeSpan.Zero || CalibrationCarry > TimeSpan.FromDays(366))
        {
            throw new ArgumentException("Refit:CalibrationCarry must be between 0 and 366 days.", nameof(CalibrationCarry));
        }

        if (WindowCacheMegabytes is < 0 or > 65_536)
        {
            throw new ArgumentException("Refit:WindowCacheMegabytes must be between 0 and 65536.", nameof(WindowCacheMegabytes));
        }

        if (ModelMaxAge <= TimeSpan.Zero || SweepInterval <= TimeSpan.Zero)
        {
            throw new ArgumentException("Refit:ModelMaxAge and Refit:SweepInterval must be positive.", nameof(ModelMaxAge));
        }
    }
}
