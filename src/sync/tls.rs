//! TLS to the hub with rustls (pure Rust: no system library), as `sslmode` asks:
//! `require` encrypts without checking the certificate (as PostgreSQL's own client
//! does); `verify-ca` checks it against `sslrootcert` (or the bundled web roots);
//! `verify-full` also checks that it names the host.

use std::sync::Arc;

use rustls::client::WebPkiServerVerifier;
use rustls::client::danger::{HandshakeSignatureValid, ServerCertVerified, ServerCertVerifier};
use rustls::pki_types::pem::PemObject;
use rustls::pki_types::{CertificateDer, ServerName, UnixTime};
use rustls::{ClientConfig, DigitallySignedStruct, Error, RootCertStore, SignatureScheme};
use tokio_postgres_rustls::MakeRustlsConnect;

use super::SyncError;
use super::target::{Target, TlsMode};

/// Checks the certificate as `verify-ca` or not at all (`require`); the handshake's
/// signatures are always checked.
#[derive(Debug)]
struct Lenient {
    /// `Some` checks the chain (not the name); `None` checks nothing.
    chain: Option<Arc<WebPkiServerVerifier>>,
    provider: Arc<rustls::crypto::CryptoProvider>,
}

impl ServerCertVerifier for Lenient {
    fn verify_server_cert(
        &self,
        end_entity: &CertificateDer<'_>,
        intermediates: &[CertificateDer<'_>],
        server_name: &ServerName<'_>,
        ocsp_response: &[u8],
        now: UnixTime,
    ) -> Result<ServerCertVerified, Error> {
        let Some(chain) = &self.chain else {
            return Ok(ServerCertVerified::assertion());
        };
        match chain.verify_server_cert(end_entity, intermediates, server_name, ocsp_response, now) {
            Err(Error::InvalidCertificate(rustls::CertificateError::NotValidForName))
            | Err(Error::InvalidCertificate(rustls::CertificateError::NotValidForNameContext {
                ..
            })) => Ok(ServerCertVerified::assertion()),
            other => other,
        }
    }

    fn verify_tls12_signature(
        &self,
        message: &[u8],
        cert: &CertificateDer<'_>,
        dss: &DigitallySignedStruct,
    ) -> Result<HandshakeSignatureValid, Error> {
        rustls::crypto::verify_tls12_signature(
            message,
            cert,
            dss,
            &self.provider.signature_verification_algorithms,
        )
    }

    fn verify_tls13_signature(
        &self,
        message: &[u8],
        cert: &CertificateDer<'_>,
        dss: &DigitallySignedStruct,
    ) -> Result<HandshakeSignatureValid, Error> {
        rustls::crypto::verify_tls13_signature(
            message,
            cert,
            dss,
            &self.provider.signature_verification_algorithms,
        )
    }

    fn supported_verify_schemes(&self) -> Vec<SignatureScheme> {
        self.provider
            .signature_verification_algorithms
            .supported_schemes()
    }
}

fn roots(target: &Target) -> Result<RootCertStore, SyncError> {
    let Some(path) = &target.root_cert else {
        return Ok(RootCertStore {
            roots: webpki_roots::TLS_SERVER_ROOTS.to_vec(),
        });
    };
    let bad = |e: &dyn std::fmt::Display| {
        SyncError::Config(format!(
            "sslrootcert {} could not be read as PEM certificates: {e}",
            path.display()
        ))
    };
    let mut store = RootCertStore::empty();
    for cert in CertificateDer::pem_file_iter(path).map_err(|e| bad(&e))? {
        store.add(cert.map_err(|e| bad(&e))?).map_err(|e| bad(&e))?;
    }
    if store.is_empty() {
        return Err(bad(&"it holds no certificate"));
    }
    Ok(store)
}

/// The TLS connector for a target that asks for TLS.
pub fn connector(target: &Target) -> Result<MakeRustlsConnect, SyncError> {
    let provider = Arc::new(rustls::crypto::ring::default_provider());
    let builder = ClientConfig::builder_with_provider(provider.clone())
        .with_safe_default_protocol_versions()
        .map_err(|e| SyncError::Config(format!("TLS could not be set up: {e}")))?;
    let config = match target.tls {
        TlsMode::VerifyFull => builder.with_root_certificates(roots(target)?),
        mode => {
            let chain = if mode == TlsMode::VerifyCa {
                Some(
                    WebPkiServerVerifier::builder_with_provider(
                        Arc::new(roots(target)?),
                        provider.clone(),
                    )
                    .build()
                    .map_err(|e| SyncError::Config(format!("TLS could not be set up: {e}")))?,
                )
            } else {
                None
            };
            builder
                .dangerous()
                .with_custom_certificate_verifier(Arc::new(Lenient { chain, provider }))
        }
    }
    .with_no_client_auth();
    Ok(MakeRustlsConnect::new(config))
}
