namespace ForecastHub.Api.Alerts;

/// <summary>Settings of alert evaluation (<c>Alerts:*</c>).</summary>
public sealed class AlertOptions
{
    public const string SectionName = "Alerts";

    /// <summary>Minutes between sweeps that evaluate every site, so an alert leaves even when no data or refit triggers it.</summary>
    public int SweepMinutes { get; set; } = 15;

    public void Validate()
    {
        if (SweepMinutes is < 1 or > 15)
        {
            throw new ArgumentException("Alerts:SweepMinutes must be 1-15: risk is looked at at least every 15 minutes.");
        }
    }
}
