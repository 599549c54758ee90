package graftwork.testserver;

import java.io.IOException;
import java.nio.file.Files;
import java.nio.file.Path;
import java.time.Duration;
import java.util.concurrent.CountDownLatch;

import org.neo4j.configuration.GraphDatabaseSettings;
import org.neo4j.configuration.connectors.BoltConnector;
import org.neo4j.configuration.helpers.SocketAddress;
import org.neo4j.dbms.api.DatabaseManagementService;
import org.neo4j.dbms.api.DatabaseManagementServiceBuilder;
import org.neo4j.graphdb.GraphDatabaseService;

/**
 * A Neo4j Community database for graftwork's tests: Bolt on 127.0.0.1 only, authentication on, the password of
 * user {@code neo4j} taken from the environment (never from the command line, so it is not visible in `ps`).
 *
 * <pre>
 *   GRAFTWORK_TEST_NEO4J_PASSWORD=... java -cp ... graftwork.testserver.TestServer HOME_DIR PORT [READY_FILE]
 * </pre>
 * Prints "graftwork-test-neo4j ready bolt://127.0.0.1:PORT" once the database answers, writes the same URI to
 * READY_FILE when given, and shuts down cleanly on SIGTERM or when standard input closes.
 */
public final class TestServer {
    private TestServer() {}

    public static void main(String[] args) throws Exception {
        if (args.length < 2) {
            System.err.println("usage: TestServer HOME_DIR PORT [READY_FILE]");
            System.exit(2);
        }
        Path home = Path.of(args[0]).toAbsolutePath();
        int port = Integer.parseInt(args[1]);
        String password = System.getenv("GRAFTWORK_TEST_NEO4J_PASSWORD");
        if (password == null || password.length() < 8) {
            System.err.println("set GRAFTWORK_TEST_NEO4J_PASSWORD (8 characters or more) before starting");
            System.exit(2);
        }
        Files.createDirectories(home);

        DatabaseManagementService dbms = new DatabaseManagementServiceBuilder(home)
                .setConfig(BoltConnector.enabled, true)
                .setConfig(BoltConnector.listen_address, new SocketAddress("127.0.0.1", port))
                .setConfig(BoltConnector.advertised_address, new SocketAddress("127.0.0.1", port))
                .setConfig(GraphDatabaseSettings.auth_enabled, true)
                // Small caches: the CI machine has 2 cores and is shared with the Python test process.
                .setConfig(GraphDatabaseSettings.pagecache_memory, 256L * 1024 * 1024)
                .setConfig(GraphDatabaseSettings.transaction_timeout, Duration.ofMinutes(10))
                .build();
        CountDownLatch stop = new CountDownLatch(1);
        Runtime.getRuntime().addShutdownHook(new Thread(() -> {
            dbms.shutdown();
            stop.countDown();
        }));

        // Embedded access is not authenticated, so the password can be set here, before any client connects.
        GraphDatabaseService system = dbms.database(GraphDatabaseSettings.SYSTEM_DATABASE_NAME);
        system.executeTransactionally("ALTER USER neo4j SET PASSWORD $pw CHANGE NOT REQUIRED",
                java.util.Map.of("pw", password));
        dbms.database(GraphDatabaseSettings.DEFAULT_DATABASE_NAME).executeTransactionally("RETURN 1");

        String uri = "bolt://127.0.0.1:" + port;
        if (args.length > 2) {
            Path ready = Path.of(args[2]);
            Files.writeString(ready, uri + "\n");
        }
        System.out.println("graftwork-test-neo4j ready " + uri);
        System.out.flush();

        Thread stdinWatch = new Thread(() -> {
            try {
                while (System.in.read() >= 0) {
                    // keep reading until the parent closes our standard input
                }
            } catch (IOException ignored) {
                // treated like end of input
            }
            System.exit(0);  // runs the shutdown hook
        });
        stdinWatch.setDaemon(true);
        stdinWatch.start();
        stop.await();
    }
}
