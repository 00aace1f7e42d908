package dev.onefold.internal.archive;

import dev.onefold.OnefoldException;
import dev.onefold.spi.Storage;
import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.file.FileAlreadyExistsException;
import java.nio.file.FileVisitResult;
import java.nio.file.Files;
import java.nio.file.NoSuchFileException;
import java.nio.file.Path;
import java.nio.file.SimpleFileVisitor;
import java.nio.file.StandardOpenOption;
import java.nio.file.attribute.BasicFileAttributes;
import java.util.ArrayList;
import java.util.Collection;
import java.util.List;
import java.util.TreeSet;
import java.util.UUID;

/**
 * {@link Storage} over a local directory. {@link #write} writes and fsyncs the file; {@link #sync} fsyncs the
 * directories on the way from each file up to the root, so new directory entries survive a crash;
 * {@link #createIfAbsent} writes a temporary file, fsyncs it and publishes it with a hard link, which the
 * operating system creates atomically and only if the name is free, then fsyncs the directory.
 *
 * <p>Thread-safe (all state is in the file system). Every name is resolved under the root and checked so no
 * name can reach outside it.
 */
public final class LocalStorage implements Storage {
    static final String TEMP_MARK = ".tmp-";
    private final Path root;

    public LocalStorage(Path root) {
        this.root = root.toAbsolutePath().normalize();
        try {
            Files.createDirectories(this.root);
        } catch (IOException e) {
            throw io("cannot create archive directory " + this.root, e);
        }
    }

    public Path root() {
        return root;
    }

    private Path path(String name) {
        Path p = root.resolve(StorageNames.check(name)).normalize();
        if (!p.startsWith(root)) {
            throw OnefoldException.usage("storage name '" + name + "' leaves the archive directory");
        }
        return p;
    }

    private static OnefoldException io(String message, IOException e) {
        return new OnefoldException(OnefoldException.Kind.IO, message + ": " + e, e);
    }

    @Override
    public void write(String name, byte[] data) {
        Path p = path(name);
        try {
            Files.createDirectories(p.getParent());
            writeDurably(p, data, StandardOpenOption.CREATE, StandardOpenOption.TRUNCATE_EXISTING);
        } catch (IOException e) {
            throw io("cannot write " + name, e);
        }
    }

    private static void writeDurably(Path p, byte[] data, StandardOpenOption... options) throws IOException {
        List<StandardOpenOption> opts = new ArrayList<>(List.of(options));
        opts.add(StandardOpenOption.WRITE);
        try (FileChannel ch = FileChannel.open(p, opts.toArray(new StandardOpenOption[0]))) {
            ByteBuffer b = ByteBuffer.wrap(data);
            while (b.hasRemaining()) {
                ch.write(b);
            }
            ch.force(true);
        }
    }

    @Override
    public void sync(Collection<String> names) {
        TreeSet<Path> dirs = new TreeSet<>();
        for (String n : names) {
            for (Path d = path(n).getParent(); d != null && d.startsWith(root); d = d.getParent()) {
                dirs.add(d);
            }
        }
        for (Path d : dirs.descendingSet()) {
            syncDirectory(d);
        }
    }

    private static void syncDirectory(Path dir) {
        try (FileChannel ch = FileChannel.open(dir, StandardOpenOption.READ)) {
            ch.force(true);
        } catch (IOException e) {
            throw io("cannot fsync directory " + dir, e);
        }
    }

    @Override
    public boolean createIfAbsent(String name, byte[] data) {
        Path p = path(name);
        Path temp = p.resolveSibling(p.getFileName() + TEMP_MARK + UUID.randomUUID());
        try {
            Files.createDirectories(p.getParent());
            writeDurably(temp, data, StandardOpenOption.CREATE_NEW);
            try {
                Files.createLink(p, temp);
            } catch (FileAlreadyExistsException e) {
                return false;
            } catch (UnsupportedOperationException e) {
                throw OnefoldException.usage("the file system under " + root + " cannot create hard links, which the "
                        + "archive needs for its atomic commit");
            }
            syncDirectory(p.getParent());
            return true;
        } catch (IOException e) {
            throw io("cannot create " + name, e);
        } finally {
            try {
                Files.deleteIfExists(temp);
            } catch (IOException e) {
                throw io("cannot delete temporary file " + temp, e);
            }
        }
    }

    @Override
    public byte[] read(String name) {
        try {
            return Files.readAllBytes(path(name));
        } catch (NoSuchFileException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "file " + name + " does not exist", e);
        } catch (IOException e) {
            throw io("cannot read " + name, e);
        }
    }

    @Override
    public byte[] read(String name, long offset, int length) {
        try (FileChannel ch = FileChannel.open(path(name), StandardOpenOption.READ)) {
            if (offset < 0 || length < 0 || offset + length > ch.size()) {
                throw new OnefoldException(OnefoldException.Kind.IO, "cannot read bytes " + offset + ".." + (offset + length)
                        + " of " + name + ": it has " + ch.size() + " bytes");
            }
            ByteBuffer b = ByteBuffer.allocate(length);
            while (b.hasRemaining()) {
                if (ch.read(b, offset + b.position()) < 0) {
                    throw new OnefoldException(OnefoldException.Kind.IO, "file " + name + " ended early");
                }
            }
            return b.array();
        } catch (NoSuchFileException e) {
            throw new OnefoldException(OnefoldException.Kind.IO, "file " + name + " does not exist", e);
        } catch (IOException e) {
            throw io("cannot read " + name, e);
        }
    }

    @Override
    public long size(String name) {
        Path p = path(name);
        try {
            return Files.isRegularFile(p) ? Files.size(p) : -1;
        } catch (NoSuchFileException e) {
            return -1;
        } catch (IOException e) {
            throw io("cannot stat " + name, e);
        }
    }

    @Override
    public long modifiedMillis(String name) {
        Path p = path(name);
        try {
            return Files.isRegularFile(p) ? Files.getLastModifiedTime(p).toMillis() : -1;
        } catch (NoSuchFileException e) {
            return -1;
        } catch (IOException e) {
            throw io("cannot stat " + name, e);
        }
    }

    @Override
    public List<String> list(String prefix) {
        int slash = prefix.lastIndexOf('/');
        Path dir = slash < 0 ? root : path(prefix.substring(0, slash));
        if (!Files.isDirectory(dir)) {
            return List.of();
        }
        TreeSet<String> out = new TreeSet<>();
        try {
            // a walk that tolerates files vanishing under it: other writers delete their temporary files at any
            // moment, and a file gone before its attributes were read was not listed
            Files.walkFileTree(dir, new SimpleFileVisitor<>() {
                @Override
                public FileVisitResult visitFile(Path f, BasicFileAttributes attrs) {
                    String n = root.relativize(f).toString().replace(f.getFileSystem().getSeparator(), "/");
                    if (attrs.isRegularFile() && n.startsWith(prefix)) {
                        out.add(n);
                    }
                    return FileVisitResult.CONTINUE;
                }

                @Override
                public FileVisitResult visitFileFailed(Path f, IOException e) throws IOException {
                    if (e instanceof NoSuchFileException) {
                        return FileVisitResult.CONTINUE;
                    }
                    throw e;
                }
            });
        } catch (IOException e) {
            throw io("cannot list " + dir, e);
        }
        return List.copyOf(out);
    }

    @Override
    public void delete(String name) {
        Path p = path(name);
        try {
            if (Files.deleteIfExists(p)) {
                syncDirectory(p.getParent());
            }
        } catch (IOException e) {
            throw io("cannot delete " + name, e);
        }
    }

    @Override
    public String toString() {
        return "local storage at " + root;
    }
}
