using ForecastHub.Api.Models;

namespace ForecastHub.Api.Tests.Models;

/// <summary>When a site is queued for a fit (defaults of RefitOptions: 24 new hourly / 3 daily points, 3 days of age).</summary>
public sealed class RefitPolicyTests
{
    private static readonly DateTimeOffset Now = new(2025, 6, 1, 12, 0, 0, TimeSpan.Zero);
    private static readonly RefitOptions Defaults = new();

    // A fitted hourly site whose model saw every point up to an hour ago, fitted with the current settings.
    private static RefitFacts Fitted(bool isDaily = false) => new(
        IsDaily: isDaily, GridPoints: 500, MinPoints: 168, SiteSettingsVersion: 2,
        ModelFittedAt: Now.AddHours(-1), ModelSettingsVersion: 2, ModelDataPoints: 500, ModelDataEnd: Now.AddHours(-1),
        LastGridTime: Now.AddHours(-1), Now: Now);

    private static RefitFacts Unfitted(int points) => Fitted() with
    {
        GridPoints = points, ModelFittedAt = null, ModelSettingsVersion = null, ModelDataPoints = null, ModelDataEnd = null,
    };

    [Fact]
    public void SiteWithoutAModelIsFittedOnceItHasEnoughPoints()
    {
        Assert.Null(RefitPolicy.Decide(Unfitted(167), Defaults));
        Assert.Equal(RefitReason.FirstFit, RefitPolicy.Decide(Unfitted(168), Defaults));
    }

    [Fact]
    public void UpToDateModelIsKept() => Assert.Null(RefitPolicy.Decide(Fitted(), Defaults));

    [Fact]
    public void SettingsChangeRefitsEvenWithoutNewData() =>
        Assert.Equal(RefitReason.SettingsChanged, RefitPolicy.Decide(Fitted() with { SiteSettingsVersion = 3 }, Defaults));

    [Fact]
    public void HourlySiteIsRefittedAfter24NewGridPointsNotBefore()
    {
        var newer = Fitted() with { LastGridTime = Now, ModelDataEnd = Now.AddHours(-30) };
        Assert.Null(RefitPolicy.Decide(newer with { GridPoints = 523 }, Defaults));
        Assert.Equal(RefitReason.NewData, RefitPolicy.Decide(newer with { GridPoints = 524 }, Defaults));
    }

    [Fact]
    public void DailySiteIsRefittedAfterThreeNewGridPoints()
    {
        var newer = Fitted(isDaily: true) with { MinPoints = 60, LastGridTime = Now, ModelDataEnd = Now.AddDays(-3) };
        Assert.Null(RefitPolicy.Decide(newer with { GridPoints = 502 }, Defaults));
        Assert.Equal(RefitReason.NewData, RefitPolicy.Decide(newer with { GridPoints = 503 }, Defaults));
    }

    [Fact]
    public void OldModelIsRefittedOnlyWhenNewerDataExists()
    {
        var old = Fitted() with { ModelFittedAt = Now.AddDays(-3).AddMinutes(-1), GridPoints = 501, LastGridTime = Now };
        Assert.Equal(RefitReason.ModelAge, RefitPolicy.Decide(old, Defaults));
        Assert.Null(RefitPolicy.Decide(old with { LastGridTime = old.ModelDataEnd }, Defaults));
        Assert.Null(RefitPolicy.Decide(old with { ModelFittedAt = Now.AddDays(-3).AddMinutes(1) }, Defaults));
    }

    [Fact]
    public void ThresholdsComeFromTheOptions()
    {
        var newer = Fitted() with { LastGridTime = Now, GridPoints = 505 };
        Assert.Null(RefitPolicy.Decide(newer, Defaults));
        Assert.Equal(RefitReason.NewData, RefitPolicy.Decide(newer, new RefitOptions { NewPointsHourly = 5 }));
    }
}
