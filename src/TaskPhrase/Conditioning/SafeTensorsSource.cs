using Microsoft.Win32.SafeHandles;

namespace TaskPhrase.Conditioning;

/// <summary>
/// Positional, thread-safe read access to the bytes of a safetensors file, whatever holds them
/// (a file handle, a seekable stream, a buffer in memory).
/// </summary>
internal abstract class SafeTensorsSource : IDisposable
{
    /// <summary>Total length in bytes, fixed when the source was opened.</summary>
    public abstract long Length { get; }

    /// <summary>Reads up to <c>destination.Length</c> bytes at <paramref name="offset"/>; returns how many were read (0 at the end).</summary>
    protected abstract int ReadAt(long offset, Span<byte> destination);

    /// <summary>Fills <paramref name="destination"/> from <paramref name="offset"/> or throws when the data ends early.</summary>
    public void ReadExactlyAt(long offset, Span<byte> destination, string sourceName, string? tensorName)
    {
        var done = 0;
        while (done < destination.Length)
        {
            var n = ReadAt(offset + done, destination[done..]);
            if (n <= 0)
            {
                throw new SafeTensorsException(
                    sourceName,
                    tensorName,
                    $"the data ended at byte {offset + done} although {Length} bytes were there when the file was opened; "
                    + "the file was truncated or replaced while in use. Open it again.");
            }

            done += n;
        }
    }

    /// <inheritdoc />
    public abstract void Dispose();

    /// <summary>A file read through a handle with positional reads (no shared file position).</summary>
    public sealed class FileSource(SafeFileHandle handle) : SafeTensorsSource
    {
        private readonly long length = RandomAccess.GetLength(handle);

        /// <inheritdoc />
        public override long Length => length;

        /// <inheritdoc />
        protected override int ReadAt(long offset, Span<byte> destination) => RandomAccess.Read(handle, destination, offset);

        /// <inheritdoc />
        public override void Dispose() => handle.Dispose();
    }

    /// <summary>A seekable stream; reads are serialised by a lock because a stream has one position.</summary>
    public sealed class StreamSource(Stream stream, bool leaveOpen) : SafeTensorsSource
    {
        private readonly long length = stream.Length;
        private readonly Lock gate = new();

        /// <inheritdoc />
        public override long Length => length;

        /// <inheritdoc />
        protected override int ReadAt(long offset, Span<byte> destination)
        {
            lock (gate)
            {
                stream.Position = offset;
                return stream.Read(destination);
            }
        }

        /// <inheritdoc />
        public override void Dispose()
        {
            if (!leaveOpen)
            {
                stream.Dispose();
            }
        }
    }

    /// <summary>Bytes already in memory.</summary>
    public sealed class MemorySource(ReadOnlyMemory<byte> bytes) : SafeTensorsSource
    {
        /// <inheritdoc />
        public override long Length => bytes.Length;

        /// <inheritdoc />
        protected override int ReadAt(long offset, Span<byte> destination)
        {
            if (offset >= bytes.Length)
            {
                return 0;
            }

            var available = bytes.Span[(int)offset..];
            var n = Math.Min(available.Length, destination.Length);
            available[..n].CopyTo(destination);
            return n;
        }

        /// <inheritdoc />
        public override void Dispose()
        {
        }
    }
}
