using System.Text.Json;

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
        var buffer = new MemoryStream();
        var chunk = new byte[81920];
        try
        {
            int read;
            while ((read = await request.Body.ReadAsync(chunk, cancellationToken).ConfigureAwait(false)) > 0)
            {
                if (buffer.Length + read > maxBytes)
                {
                    return null;
                }
                buffer.Write(chunk, 0, read);
            }
        }
        catch (BadHttpRequestException e) when (e.StatusCode == StatusCodes.Status413PayloadTooLarge)
        {
            return null;
        }
        return buffer.ToArray();
    }

    /// <summary>Parses strict JSON (no duplicate keys, no comments, bounded depth); on failure
    /// <paramref name="error"/> says where the body went wrong.</summary>
    public static JsonDocument? ParseJson(byte[] body, out string? error)
    {
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

    public static bool IsJson(HttpRequest request) =>
        request.ContentType is { } type
        && (type.StartsWith("application/json", StringComparison.OrdinalIgnoreCase)
            || (type.StartsWith("application/", StringComparison.OrdinalIgnoreCase) && type.Split(';')[0].EndsWith("+json", StringComparison.OrdinalIgnoreCase)));

    public static bool IsCsv(HttpRequest request) =>
        request.ContentType is { } type && type.StartsWith("text/csv", StringComparison.OrdinalIgnoreCase);
}
