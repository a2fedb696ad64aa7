namespace ForecastHub.Api.Hosting;

/// <summary>
/// A request body of unknown length (chunked) counted by its payload: past <c>maxBytes</c> a read
/// fails with a 413 bad request, as the server's own limit does, but the chunk framing around the
/// payload is not counted.
/// </summary>
internal sealed class PayloadLimitStream(Stream inner, long maxBytes) : Stream
{
    private long read;

    public override bool CanRead => true;

    public override bool CanSeek => false;

    public override bool CanWrite => false;

    public override long Length => throw new NotSupportedException();

    public override long Position
    {
        get => read;
        set => throw new NotSupportedException();
    }

    public override int Read(byte[] buffer, int offset, int count) => Count(inner.Read(buffer, offset, count));

    public override async ValueTask<int> ReadAsync(Memory<byte> buffer, CancellationToken cancellationToken = default) =>
        Count(await inner.ReadAsync(buffer, cancellationToken).ConfigureAwait(false));

    public override Task<int> ReadAsync(byte[] buffer, int offset, int count, CancellationToken cancellationToken) =>
        ReadAsync(buffer.AsMemory(offset, count), cancellationToken).AsTask();

    public override void Flush()
    {
    }

    public override long Seek(long offset, SeekOrigin origin) => throw new NotSupportedException();

    public override void SetLength(long value) => throw new NotSupportedException();

    public override void Write(byte[] buffer, int offset, int count) => throw new NotSupportedException();

    private int Count(int bytes)
    {
        read += bytes;
        if (read > maxBytes)
        {
            throw new BadHttpRequestException($"The request body is larger than {maxBytes} bytes.", StatusCodes.Status413PayloadTooLarge);
        }
        return bytes;
    }
}
