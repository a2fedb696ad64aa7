namespace ForecastHub.Core.Selection;

/// <summary>Which observations the information criteria of every candidate order are computed on.</summary>
public enum CriteriaSample
{
    /// <summary>All n points (Yule-Walker, Burg: innovation variances from one recursion over the whole series).</summary>
    AllPoints,

    /// <summary>One common sample for every order: rows t &gt;= maxOrder of each segment (least squares).</summary>
    CommonRows,

    /// <summary>The exact likelihood of all n points (maximum likelihood).</summary>
    ExactLikelihood,
}
