namespace ForecastHub.Core.Settings;

/// <summary>The wire words of one setting, in the order they are listed to users, and the value each stands for.</summary>
public sealed class WordTable<T>
    where T : struct, Enum
{
    private readonly (T Value, string Word)[] entries;

    public WordTable(params (T Value, string Word)[] entries)
    {
        ArgumentNullException.ThrowIfNull(entries);
        this.entries = entries;
        Words = [.. entries.Select(e => e.Word)];
    }

    /// <summary>Every allowed word, in listing order.</summary>
    public IReadOnlyList<string> Words { get; }

    /// <summary>The word of <paramref name="value"/>.</summary>
    public string Of(T value)
    {
        foreach (var (v, word) in entries)
        {
            if (EqualityComparer<T>.Default.Equals(v, value))
            {
                return word;
            }
        }
        throw new ArgumentOutOfRangeException(nameof(value), value, $"{typeof(T).Name} has no wire word.");
    }

    /// <summary>The value of an allowed word (exact, case-sensitive); false for anything else.</summary>
    public bool TryParse(string? word, out T value)
    {
        foreach (var (v, w) in entries)
        {
            if (string.Equals(w, word, StringComparison.Ordinal))
            {
                value = v;
                return true;
            }
        }
        value = default;
        return false;
    }

    /// <summary>The value of a word already validated (stored data); an unknown word is a corrupt record.</summary>
    public T Parse(string word) => TryParse(word, out var value)
        ? value
        : throw new FormatException($"'{word}' is not one of {string.Join(", ", Words)}.");
}
