//! TLS when the URL asks for it: a server that takes only TLS connections, a
//! certificate made for the test by a throwaway authority. `require` encrypts,
//! `verify-full` checks the certificate and the host name, `verify-ca` the chain.

use std::path::Path;
use std::process::Command;

use crate::common::{Site, stderr};
use crate::server::Server;

fn openssl(dir: &Path, args: &[&str]) {
    let out = Command::new("openssl")
        .current_dir(dir)
        .args(args)
        .output()
        .expect("openssl is needed to make the test certificate");
    assert!(out.status.success(), "openssl {args:?}: {}", stderr(&out));
}

/// A throwaway authority (ca.pem) and a certificate for `localhost` signed by it.
fn certificates(dir: &Path) {
    let ec = [
        "-newkey",
        "ec",
        "-pkeyopt",
        "ec_paramgen_curve:prime256v1",
        "-nodes",
    ];
    openssl(
        dir,
        &[
            &["req", "-x509"][..],
            &ec,
            &[
                "-keyout",
                "ca.key",
                "-out",
                "ca.pem",
                "-days",
                "2",
                "-subj",
                "/CN=gelu test authority",
            ],
        ]
        .concat(),
    );
    openssl(
        dir,
        &[
            &["req"][..],
            &ec,
            &[
                "-keyout",
                "server.key",
                "-out",
                "server.csr",
                "-subj",
                "/CN=localhost",
            ],
        ]
        .concat(),
    );
    std::fs::write(
        dir.join("ext"),
        "subjectAltName=DNS:localhost\nbasicConstraints=CA:FALSE\nkeyUsage=digitalSignature\nextendedKeyUsage=serverAuth\n",
    )
    .unwrap();
    openssl(
        dir,
        &[
            "x509",
            "-req",
            "-in",
            "server.csr",
            "-CA",
            "ca.pem",
            "-CAkey",
            "ca.key",
            "-CAcreateserial",
            "-out",
            "server.pem",
            "-days",
            "2",
            "-extfile",
            "ext",
        ],
    );
}

#[test]
fn tls_is_used_when_the_url_asks_and_the_certificate_is_checked() {
    let certs = tempfile::tempdir().unwrap();
    certificates(certs.path());
    // The server reads its key from its own folder, owned by its user.
    let server = Server::start_with(&["fsync=off"]);
    for f in ["server.pem", "server.key"] {
        std::fs::copy(certs.path().join(f), server.folder().join(f)).unwrap();
    }
    let chown = Command::new("sh")
        .arg("-c")
        .arg(format!(
            "chmod 600 '{0}/server.key'; if [ \"$(id -u)\" = 0 ]; then chown postgres '{0}/server.key' '{0}/server.pem'; fi",
            server.folder().display()
        ))
        .status()
        .unwrap();
    assert!(chown.success());
    let folder = server.folder().display().to_string();
    for setting in [
        "ssl = on".to_owned(),
        format!("ssl_cert_file = '{folder}/server.pem'"),
        format!("ssl_key_file = '{folder}/server.key'"),
    ] {
        server.sql("postgres", &format!("ALTER SYSTEM SET {setting}"));
    }
    // Only TLS connections over TCP from now on.
    server.prepend_hba("hostnossl all all 0.0.0.0/0 reject");
    let db = server.new_database("tls");
    let ca = certs.path().join("ca.pem");
    let plain = server.admin(&db);
    let named = plain.replace("127.0.0.1", "localhost");

    let site = Site::new("KTN");
    site.new_batch("over TLS");
    let refused = site.sync(&plain).unwrap_err();
    assert!(stderr(&refused).contains("refused"), "{}", stderr(&refused));

    let sent = site.sync_ok(&format!("{plain}?sslmode=require"));
    assert_eq!(sent["pushed"]["batches"], 1, "{sent}");
    let full = format!("{named}?sslmode=verify-full&sslrootcert={}", ca.display());
    site.sync_ok(&full);
    let chain_only = format!("{plain}?sslmode=verify-ca&sslrootcert={}", ca.display());
    site.sync_ok(&chain_only);

    // The certificate names localhost, not 127.0.0.1: verify-full refuses it there.
    let wrong_name = format!("{plain}?sslmode=verify-full&sslrootcert={}", ca.display());
    let out = site.sync(&wrong_name).unwrap_err();
    assert!(
        stderr(&out).contains("could not be reached"),
        "{}",
        stderr(&out)
    );
    // And a certificate from another authority is refused.
    let other = tempfile::tempdir().unwrap();
    certificates(other.path());
    let stranger = format!(
        "{named}?sslmode=verify-full&sslrootcert={}",
        other.path().join("ca.pem").display()
    );
    assert!(site.sync(&stranger).is_err());
}
