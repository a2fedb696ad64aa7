using ForecastHub.Storage.Keys;
using Microsoft.Extensions.Options;

namespace ForecastHub.Api.Auth;

/// <summary>Where the generated first admin key is printed, once; standard output unless replaced.</summary>
public sealed class FirstAdminKeyOutput(TextWriter writer)
{
    public TextWriter Writer { get; } = writer;
}

/// <summary>
/// At start, after the migrations: when no admin key is configured and none is stored, generates
/// one, stores its digest and prints the secret once to <see cref="FirstAdminKeyOutput"/>. The log
/// records only the key's id. Later starts find the stored key and print nothing.
/// </summary>
internal sealed class FirstAdminKey(
    IApiKeyStore keys,
    IOptions<AuthOptions> options,
    TimeProvider clock,
    FirstAdminKeyOutput output,
    ILogger<FirstAdminKey> logger) : IHostedLifecycleService
{
    public async Task StartingAsync(CancellationToken cancellationToken)
    {
        if (!string.IsNullOrEmpty(options.Value.AdminKey) || await keys.HasActiveAdminAsync(cancellationToken: cancellationToken).ConfigureAwait(false))
        {
            return;
        }
        var secret = ApiKeySecrets.NewSecret();
        var key = new ApiKeyRecord(ApiKeySecrets.NewId(), ApiKeySecrets.Digest(secret), ApiKeyScopes.Admin, [],
            "generated at first start", clock.GetUtcNow(), null);
        if (!await keys.CreateFirstAdminAsync(key, cancellationToken).ConfigureAwait(false))
        {
            // Another node sharing the storage generated one meanwhile and printed it.
            return;
        }

        await output.Writer.WriteLineAsync(
            $"ForecastHub generated the first admin key {key.Id}. It is shown only this once; keep it safe:{Environment.NewLine}{secret}").ConfigureAwait(false);
        await output.Writer.FlushAsync(cancellationToken).ConfigureAwait(false);
        logger.LogWarning("No admin key was configured or stored; generated admin key {KeyId} and printed its secret once to standard output", key.Id);
    }

    public Task StartAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StartedAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppingAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StopAsync(CancellationToken cancellationToken) => Task.CompletedTask;

    public Task StoppedAsync(CancellationToken cancellationToken) => Task.CompletedTask;
}
