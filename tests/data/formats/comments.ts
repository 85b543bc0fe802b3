/** Options accepted by the client. */
interface Options {
  url: string; // where to connect
  retries: number; /* how often to try */
}
