namespace ForecastHub.Api.Webhooks;

/// <summary>Settings of webhook delivery (<c>Webhooks:*</c>).</summary>
public sealed class WebhookOptions
{
    public const string SectionName = "Webhooks";

    /// <summary>Allows webhook addresses on loopback, private, link-local and other non-public networks (off: only public addresses).</summary>
    public bool AllowPrivateNetworks { get; set; }

    /// <summary>How long one delivery attempt may take before it counts as failed.</summary>
    public int TimeoutSeconds { get; set; } = 10;

    /// <summary>Seconds from a failed attempt to the first retry; each later wait doubles, up to 24 hours after the event.</summary>
    public int FirstRetrySeconds { get; set; } = 60;

    public void Validate()
    {
        if (FirstRetrySeconds is < 1 or > 3600)
        {
            throw new ArgumentException("Webhooks:FirstRetrySeconds must be 1-3600.");
        }
        if (TimeoutSeconds is < 1 or > 120)
        {
            throw new ArgumentException("Webhooks:TimeoutSeconds must be 1-120.");
        }
    }
}
