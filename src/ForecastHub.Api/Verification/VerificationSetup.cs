using ForecastHub.Api.Models;

namespace ForecastHub.Api.Verification;

public static class VerificationSetup
{
    /// <summary>Backtests, and the sweep step that archives day-ahead forecasts and scores them live.</summary>
    public static IServiceCollection AddVerification(this IServiceCollection services)
    {
        services.AddOptions<LiveScoreOptions>().BindConfiguration(LiveScoreOptions.SectionName)
            .Validate(o => o.WindowDays is >= 1 and <= 365 && o.MinObservedShare is > 0 and <= 1, "LiveScores:WindowDays must be 1-365 and LiveScores:MinObservedShare in (0, 1].")
            .ValidateOnStart();
        services.AddSingleton<VerificationService>();
        services.AddSingleton<ISweepStep, DayAheadArchiveStep>();
        return services;
    }
}
