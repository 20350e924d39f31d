//! The accept loop: HTTP/1.1 connections with a time limit on reading a request's head, on a
//! connection's life and on each request, and a cap on the connections served at once.

use std::sync::Arc;
use std::time::Duration;

use axum::Router;
use hyper_util::rt::{TokioIo, TokioTimer};
use hyper_util::service::TowerToHyperService;
use tokio::net::TcpListener;
use tokio::sync::Semaphore;

/// Time a client has to send a request's head (slow clients hold a connection open).
const HEADER_TIMEOUT: Duration = Duration::from_secs(10);
/// The longest a connection is kept, requests and keep-alive together.
const CONNECTION_LIMIT: Duration = Duration::from_secs(300);
/// Connections served at once; more wait to be accepted.
const MAX_CONNECTIONS: usize = 64;
/// The largest request head read, bytes.
const MAX_HEAD: usize = 64 * 1024;

/// Serves `app` on `listener` until the process stops.
pub(super) async fn serve(listener: TcpListener, app: Router) {
    let slots = Arc::new(Semaphore::new(MAX_CONNECTIONS));
    loop {
        let Ok(slot) = slots.clone().acquire_owned().await else {
            return;
        };
        let stream = match listener.accept().await {
            Ok((stream, _)) => stream,
            Err(_) => {
                // Out of file descriptors or a connection reset before it was accepted: the
                // listener is still good, so wait a moment and go on.
                tokio::time::sleep(Duration::from_millis(100)).await;
                continue;
            }
        };
        let service = TowerToHyperService::new(app.clone());
        tokio::spawn(async move {
            let mut builder = hyper::server::conn::http1::Builder::new();
            builder
                .timer(TokioTimer::new())
                .header_read_timeout(HEADER_TIMEOUT)
                .max_buf_size(MAX_HEAD);
            let connection = builder.serve_connection(TokioIo::new(stream), service);
            // A connection that outlives its limit is dropped, whatever its client does.
            let _ = tokio::time::timeout(CONNECTION_LIMIT, connection).await;
            drop(slot);
        });
    }
}
