using System.Text.Json;
using Microsoft.AspNetCore.Http.HttpResults;

namespace ForecastHub.Api.Problems;

/// <summary>Reads request bodies under an explicit size limit, whatever the server's own limit.</summary>
public static class RequestBody
{
    public static readonly JsonDocumentOptions JsonOptions = new()
    {
        MaxDepth = 16,
        AllowDuplicateProperties = false,
        AllowTrailingCommas = false,
        CommentHandling = JsonCommentHandling.Disallow,
    };

    /// <summary>The body, or null when it is longer than <paramref name="maxBytes"/>.</summary>
    public static async Task<byte[]?> ReadAsync(HttpRequest request, int maxBytes, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(request);
        if (request.ContentLength > maxBytes)
        {
            return null;
        }
        try
        {
            return request.ContentLength is { } length
                ? await ReadExactlyAsync(request.Body, (int)length, cancellationToken).ConfigureAwait(false)
                : await ReadToEndAsync(request.Body, maxBytes, cancellationToken).ConfigureAwait(false);
        }
        catch (BadHttpRequestException e) when (e.StatusCode == StatusCodes.Status413PayloadTooLarge)
        {
            return null;
        }
    }

    // A declared length is read straight into an array of that size: no growing buffer, no copy
    // (a 10,000-reading body is about 450 KB). The server ends the request if fewer bytes arrive.
    private static async Task<byte[]> ReadExactlyAsync(Stream body, int length, CancellationToken cancellationToken)
    {
        var bytes = new byte[length];
        var filled = 0;
        int read;
        while (filled < length && (read = await body.ReadAsync(bytes.AsMemory(filled), cancellationToken).ConfigureAwait(false)) > 0)
        {
            filled += read;
        }
        return filled == length ? bytes : bytes[..filled];
    }

    private static async Task<byte[]?> ReadToEndAsync(Stream body, int maxBytes, CancellationToken cancellationToken)
    {
        var buffer = new MemoryStream();
        var chunk = new byte[81920];
        int read;
        while ((read = await body.ReadAsync(chunk, cancellationToken).ConfigureAwait(false)) > 0)
        {
            if (buffer.Length + read > maxBytes)
            {
                return null;
            }
            buffer.Write(chunk, 0, read);
        }
        return buffer.ToArray();
    }

    /// <summary>Parses strict JSON (no duplicate keys, no comments, bounded depth); on failure
    /// <paramref name="error"/> says where the body went wrong.</summary>
    public static JsonDocument? ParseJson(byte[] body, out string? error)
    {
        if (InvalidUtf8At(body) is { } offset)
        {
            error = $"The body is not valid UTF-8: the bytes at offset {offset} are not a UTF-8 sequence.";
            return null;
        }
        try
        {
            error = null;
            return JsonDocument.Parse(body, JsonOptions);
        }
        catch (JsonException e)
        {
            error = $"The body is not valid JSON: {e.Message}";
            return null;
        }
    }

    private static readonly JsonSerializerOptions StrictBodyOptions = new(JsonSerializerDefaults.Web)
    {
        UnmappedMemberHandling = System.Text.Json.Serialization.JsonUnmappedMemberHandling.Disallow,
        AllowDuplicateProperties = false,
    };

    /// <summary>Reads a small JSON object body into <typeparamref name="T"/>, refusing unknown members;
    /// on failure the problem names what went wrong (<paramref name="what"/> is "key request" and the like).</summary>
    public static async Task<(T? Body, ProblemHttpResult? Problem)> ReadObjectAsync<T>(
        HttpRequest request, int maxBytes, string what, string example, CancellationToken cancellationToken)
        where T : class
    {
        if (!IsJson(request))
        {
            return (null, ApiProblems.UnsupportedMediaType($"Send the {what} as JSON with 'Content-Type: application/json'."));
        }
        var bytes = await ReadAsync(request, maxBytes, cancellationToken).ConfigureAwait(false);
        if (bytes is null)
        {
            return (null, ApiProblems.TooLarge($"A {what} may be at most {maxBytes / 1024} KiB."));
        }
        using var document = ParseJson(bytes, out var error);
        if (document is null)
        {
            return (null, ApiProblems.BadRequest("body", error!));
        }
        if (document.RootElement.ValueKind != JsonValueKind.Object)
        {
            return (null, ApiProblems.BadRequest("body", $"The body must be a JSON object such as {example}."));
        }
        try
        {
            return (document.RootElement.Deserialize<T>(StrictBodyOptions)!, null);
        }
        catch (JsonException e)
        {
            var field = (e.Path ?? "$").TrimStart('$').TrimStart('.');
            return (null, ApiProblems.BadRequest(field, $"'{field}' is not allowed here or has the wrong type."));
        }
    }

    /// <summary>The offset of the first byte that is not part of a valid UTF-8 sequence, or null when
    /// all are (the JSON reader checks strings only when they are read, too late for a 400).</summary>
    public static int? InvalidUtf8At(ReadOnlySpan<byte> body)
    {
        if (System.Text.Unicode.Utf8.IsValid(body))
        {
            return null;
        }
        var offset = 0;
        while (System.Text.Rune.DecodeFromUtf8(body[offset..], out _, out var consumed) == System.Buffers.OperationStatus.Done)
        {
            offset += consumed;
        }
        return offset;
    }

    public static bool IsJson(HttpRequest request) =>
        request.ContentType is { } type
        && (type.StartsWith("application/json", StringComparison.OrdinalIgnoreCase)
            || (type.StartsWith("application/", StringComparison.OrdinalIgnoreCase) && type.Split(';')[0].EndsWith("+json", StringComparison.OrdinalIgnoreCase)));

    public static bool IsCsv(HttpRequest request) =>
        request.ContentType is { } type && type.StartsWith("text/csv", StringComparison.OrdinalIgnoreCase);
}
