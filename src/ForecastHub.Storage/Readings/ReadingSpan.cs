namespace ForecastHub.Storage.Readings;

/// <summary>The first and last stored reading times of a site (UTC milliseconds) and how many there are.</summary>
public readonly record struct ReadingSpan(long FirstMs, long LastMs, long Count);
