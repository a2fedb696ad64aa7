using System.Globalization;
using System.Reflection;
using ForecastHub.Api.Tests.TestSupport;

namespace ForecastHub.Api.Tests.Security;

public sealed class ConfigurationDocsTests
{
    /// <summary>Every options class (a type with a <c>SectionName</c> constant) in the service.</summary>
    public static TheoryData<string> OptionsTypes()
    {
        var data = new TheoryData<string>();
        foreach (var type in new[] { typeof(Program).Assembly, typeof(ForecastHub.Storage.StorageOptions).Assembly }
                     .SelectMany(a => a.GetTypes())
                     .Where(t => t.GetField("SectionName", BindingFlags.Public | BindingFlags.Static) is { IsLiteral: true }))
        {
            data.Add(type.AssemblyQualifiedName!);
        }
        return data;
    }

    [Theory]
    [MemberData(nameof(OptionsTypes))]
    public void EveryOptionIsDocumentedWithItsDefaultAndEnvironmentVariable(string typeName)
    {
        var type = Type.GetType(typeName, throwOnError: true)!;
        var section = (string)type.GetField("SectionName")!.GetRawConstantValue()!;
        var docs = RepoFiles.Read("README.md").Split('\n');

        foreach (var (key, value) in Options(section, Activator.CreateInstance(type)!))
        {
            var row = docs.FirstOrDefault(l => l.StartsWith($"| `{key}` |", StringComparison.Ordinal));
            Assert.True(row is not null, $"README.md configuration table has no row for `{key}`");
            Assert.Contains($"`{key.Replace(":", "__", StringComparison.Ordinal)}`", row, StringComparison.Ordinal);
            Assert.True(row.Contains($"`{value}`", StringComparison.Ordinal)
                || (value.Length == 0 && row.Contains("| empty |", StringComparison.Ordinal))
                || row.Contains("| computed: ", StringComparison.Ordinal),
                $"the row for `{key}` does not state its default `{value}`");
        }
    }

    private static IEnumerable<(string Key, string Default)> Options(string prefix, object instance)
    {
        foreach (var property in instance.GetType().GetProperties(BindingFlags.Public | BindingFlags.Instance).Where(p => p.CanWrite))
        {
            var value = property.GetValue(instance);
            var key = $"{prefix}:{property.Name}";
            if (value is null || value is string || property.PropertyType.IsPrimitive || property.PropertyType.IsEnum || value is decimal)
            {
                yield return (key, value switch
                {
                    bool b => b ? "true" : "false",
                    IFormattable f => f.ToString(null, CultureInfo.InvariantCulture),
                    _ => value?.ToString() ?? "",
                });
            }
            else
            {
                foreach (var nested in Options(key, value))
                {
                    yield return nested;
                }
            }
        }
    }
}
