namespace ForecastHub.Core.Series;

/// <summary>Thrown by the core when a series cannot be used; <see cref="Problem"/> says why.</summary>
public sealed class SeriesException : ArgumentException
{
    public SeriesException()
        : this(SeriesProblem.Empty, "The series is empty.")
    {
    }

    public SeriesException(string message)
        : this(SeriesProblem.Empty, message)
    {
    }

    public SeriesException(string message, Exception innerException)
        : base(message, innerException)
    {
    }

    public SeriesException(SeriesProblem problem, string message)
        : base(message)
    {
        Problem = problem;
    }

    public SeriesProblem Problem { get; }
}
