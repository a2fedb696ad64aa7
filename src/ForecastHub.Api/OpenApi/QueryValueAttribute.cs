namespace ForecastHub.Api.OpenApi;

/// <summary>What a query value is once the handler has parsed it.</summary>
public enum QueryValueKind
{
    /// <summary>Free text, such as a column name or an opaque cursor.</summary>
    Text,

    /// <summary>A whole number.</summary>
    WholeNumber,

    /// <summary>Comma-separated numbers (<c>below=0,-2</c>).</summary>
    NumberList,

    /// <summary>An ISO 8601 instant with an offset.</summary>
    DateTime,

    /// <summary>One of <see cref="QueryValueAttribute.Values"/>.</summary>
    Choice,
}

/// <summary>
/// Documents a query parameter that the handler binds as text (so that a bad value is answered by a
/// problem naming the parameter, not by the framework's bare 400) with the type, range, choices and
/// default the handler applies. <see cref="QueryValuesFilter"/> writes it into the OpenAPI document.
/// </summary>
[AttributeUsage(AttributeTargets.Parameter | AttributeTargets.Property)]
public sealed class QueryValueAttribute(QueryValueKind kind) : Attribute
{
    public QueryValueKind Kind { get; } = kind;

    /// <summary>Smallest allowed value (integers and each number of a list); NaN: no bound.</summary>
    public double Minimum { get; set; } = double.NaN;

    /// <summary>Largest allowed value (integers and each number of a list); NaN: no bound.</summary>
    public double Maximum { get; set; } = double.NaN;

    /// <summary>Whether <see cref="Minimum"/> and <see cref="Maximum"/> are themselves excluded.</summary>
    public bool ExclusiveBounds { get; set; }

    /// <summary>The value used when the parameter is absent (a number, or text as the query would spell it); null: none.</summary>
    public object? Default { get; set; }

    /// <summary>The accepted values of a <see cref="QueryValueKind.Choice"/>.</summary>
    public string[] Values { get; set; } = [];

    /// <summary>Most numbers a list takes; 0: no bound.</summary>
    public int MaxItems { get; set; }
}
