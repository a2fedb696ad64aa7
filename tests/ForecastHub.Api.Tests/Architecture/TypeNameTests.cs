using System.Reflection;

namespace ForecastHub.Api.Tests.Architecture;

/// <summary>One name, one type: a public type name is defined once across Core, Storage and the service,
/// so a reader (and the OpenAPI schema names) never has to ask which one is meant.</summary>
public sealed class TypeNameTests
{
    [Fact]
    public void NoPublicTypeNameIsDefinedTwice()
    {
        var assemblies = new[] { typeof(Program).Assembly, typeof(Storage.StorageOptions).Assembly, typeof(Core.Grid.GridClock).Assembly };
        var shared = assemblies
            .SelectMany(a => a.GetExportedTypes())
            .Where(t => t.GetCustomAttribute<System.Runtime.CompilerServices.CompilerGeneratedAttribute>() is null)
            .GroupBy(t => t.Name, StringComparer.Ordinal)
            .Where(g => g.Count() > 1)
            .Select(g => $"{g.Key}: {string.Join(", ", g.Select(t => t.FullName))}")
            .ToList();

        Assert.True(shared.Count == 0, "type names defined twice:\n" + string.Join('\n', shared));
    }

    [Fact]
    public void HostingPlumbingDependsOnNoFeature()
    {
        // Features may use the plumbing (body limits, decoration); the plumbing never reaches back into a feature.
        var features = new[] { "Sites", "Observations", "Models", "Forecasts", "Verification", "Health", "Keys", "Metrics", "Dashboard", "Demo", "CommandLine" }
            .Select(f => $"ForecastHub.Api.{f}").ToHashSet(StringComparer.Ordinal);
        var hosting = typeof(Program).Assembly.GetTypes().Where(t => t.Namespace == "ForecastHub.Api.Hosting");
        var reached = hosting
            .SelectMany(t => t.GetMethods(BindingFlags.Public | BindingFlags.NonPublic | BindingFlags.Static | BindingFlags.Instance | BindingFlags.DeclaredOnly)
                .SelectMany(m => m.GetParameters().Select(p => p.ParameterType).Append(m.ReturnType))
                .Concat(t.GetConstructors(BindingFlags.Public | BindingFlags.NonPublic | BindingFlags.Instance).SelectMany(c => c.GetParameters().Select(p => p.ParameterType)))
                .Concat(t.GetFields(BindingFlags.Public | BindingFlags.NonPublic | BindingFlags.Static | BindingFlags.Instance).Select(f => f.FieldType))
                .Select(used => (Hosting: t.FullName, Used: used)))
            .Where(x => x.Used.Namespace is { } ns && features.Contains(ns))
            .Select(x => $"{x.Hosting} uses {x.Used.FullName}")
            .Distinct()
            .ToList();

        Assert.True(reached.Count == 0, string.Join('\n', reached));
    }
}
