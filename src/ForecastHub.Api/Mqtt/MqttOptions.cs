namespace ForecastHub.Api.Mqtt;

/// <summary>Configuration section <c>Mqtt</c>: the optional subscription for loggers that publish over MQTT.</summary>
public sealed class MqttOptions
{
    public const string SectionName = "Mqtt";
    public const int DefaultPort = 1883;

    /// <summary>The broker as <c>host:port</c> (port 1883 when left out); empty: no subscription.</summary>
    public string Server { get; set; } = "";

    public string Username { get; set; } = "";

    public string Password { get; set; } = "";

    /// <summary>Topics are <c>PREFIX/sites/SITE/observations</c> and the answers <c>.../observations/outcome</c>.</summary>
    public string TopicPrefix { get; set; } = "forecasthub";

    /// <summary>The longest wait between reconnection attempts; the waits double from one second up to it.</summary>
    public int MaxReconnectDelaySeconds { get; set; } = 60;

    public bool Enabled => Server.Trim().Length > 0;

    /// <summary>Host and port of <see cref="Server"/>; null with the reason when it is malformed.</summary>
    public (string Host, int Port)? Endpoint(out string? error)
    {
        error = null;
        var text = Server.Trim();
        var colon = text.LastIndexOf(':');
        var host = colon < 0 ? text : text[..colon];
        var port = DefaultPort;
        if (host.Length == 0 || (colon >= 0 && (!int.TryParse(text[(colon + 1)..], System.Globalization.NumberStyles.None,
                System.Globalization.CultureInfo.InvariantCulture, out port) || port is < 1 or > 65535)))
        {
            error = $"Mqtt:Server must be host:port (for example broker.local:1883), not '{Server}'.";
            return null;
        }
        return (host, port);
    }

    public string? Validate()
    {
        if (Enabled && Endpoint(out var error) is null)
        {
            return error;
        }
        if (TopicPrefix.Trim().Length == 0 || TopicPrefix.AsSpan().IndexOfAny("#+") >= 0 || TopicPrefix.EndsWith('/'))
        {
            return $"Mqtt:TopicPrefix must be a topic without wildcards or a trailing '/', not '{TopicPrefix}'.";
        }
        if (MaxReconnectDelaySeconds is < 1 or > 3600)
        {
            return "Mqtt:MaxReconnectDelaySeconds must be from 1 to 3600.";
        }
        return null;
    }
}
