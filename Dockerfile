# syntax=docker/dockerfile:1
# Build stage: the SDK image restores and publishes the API; nothing of it reaches the runtime image.
FROM mcr.microsoft.com/dotnet/sdk:10.0 AS build
WORKDIR /src
# Restore first from the project files alone, so the package layer is cached across source edits.
COPY global.json Directory.Build.props Directory.Packages.props ./
COPY src/ForecastHub.Core/ForecastHub.Core.csproj src/ForecastHub.Core/
COPY src/ForecastHub.Storage/ForecastHub.Storage.csproj src/ForecastHub.Storage/
COPY src/ForecastHub.Api/ForecastHub.Api.csproj src/ForecastHub.Api/
RUN dotnet restore src/ForecastHub.Api/ForecastHub.Api.csproj
COPY src/ src/
RUN dotnet publish src/ForecastHub.Api/ForecastHub.Api.csproj --no-restore -c Release -o /app /p:UseAppHost=false

# Runtime stage: ASP.NET Core runtime only, running as the image's unprivileged "app" user (uid 1654).
FROM mcr.microsoft.com/dotnet/aspnet:10.0 AS runtime
ENV ASPNETCORE_HTTP_PORTS=8080 \
    Storage__Path=/data/forecasthub.db \
    DOTNET_CLI_TELEMETRY_OPTOUT=1
WORKDIR /app
COPY --from=build /app ./
# The SQLite file and its -wal/-shm companions live on the volume, owned by the app user.
RUN mkdir -p /data && chown 1654:1654 /data
VOLUME ["/data"]
USER 1654:1654
EXPOSE 8080
# The runtime image has no curl: the app's own "healthcheck" verb asks /health/ready and exits 0 or 1.
HEALTHCHECK --interval=30s --timeout=5s --start-period=20s --retries=3 \
    CMD ["dotnet", "/app/ForecastHub.Api.dll", "healthcheck", "http://127.0.0.1:8080/health/ready"]
ENTRYPOINT ["dotnet", "/app/ForecastHub.Api.dll"]
