using ForecastHub.Storage;
using Microsoft.AspNetCore.Diagnostics;
using ForecastHub.Storage.Postgres;
using Microsoft.Data.Sqlite;
using Npgsql;

namespace ForecastHub.Api.Problems;

/// <summary>Storage trouble a request meets is named as such: a damaged file is a 503 problem, a full
/// disk a 507 problem (nothing of the request was stored), instead of a bare 500.</summary>
internal sealed class StorageProblems(IProblemDetailsService problems) : IExceptionHandler
{
    private static readonly (int, string, string) Full = (StatusCodes.Status507InsufficientStorage, "Storage full",
        "The service's storage is full, so nothing of this request was stored; send it again once space is freed.");

    public async ValueTask<bool> TryHandleAsync(HttpContext httpContext, Exception exception, CancellationToken cancellationToken)
    {
        ArgumentNullException.ThrowIfNull(httpContext);
        var (status, title, detail) = exception switch
        {
            SqliteException e when StorageHealth.IsDamage(e) => (StatusCodes.Status503ServiceUnavailable, "Storage damaged",
                "The service's storage file is damaged where this request reads or writes; nothing was changed. The operator has to restore it from a backup."),
            SqliteException e when StorageHealth.IsFullDisk(e) => Full,
            PostgresException e when PostgresErrors.IsDamage(e) => (StatusCodes.Status503ServiceUnavailable, "Storage damaged",
                "The service's database is damaged where this request reads or writes; nothing was changed. The database's operator has to repair it."),
            PostgresException e when PostgresErrors.IsFull(e) => Full,
            _ => (0, "", ""),
        };
        if (status == 0)
        {
            return false;
        }
        httpContext.Response.StatusCode = status;
        return await problems.TryWriteAsync(new ProblemDetailsContext
        {
            HttpContext = httpContext,
            Exception = exception,
            ProblemDetails = { Status = status, Title = title, Detail = detail },
        });
    }
}
