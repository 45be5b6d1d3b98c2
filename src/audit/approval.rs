//! Approval records: a named person, in a named role, at a stated time, approves a
//! run folder, and the record pins the SHA-256 of every file in it and of the data.
//! Signed with Ed25519 (RFC 8032) when a key is given, so that whoever holds the
//! public key can check that the record was not written or edited by anyone else.
//!
//! Records sit in the run folder's `approvals/` subfolder, never inside the report:
//! the report's bytes stay as the run wrote them, so an approval can pin them.
//! Electronic records with signed approvals that state their meaning are common
//! practice in validated-software work (common practice, no source).

use std::collections::BTreeMap;

use ed25519_dalek::{Signer, SigningKey, Verifier, VerifyingKey};
use serde::{Deserialize, Serialize};

use super::keys;

/// The subfolder of a run folder that holds its approval records.
pub const APPROVALS_DIR: &str = "approvals";

/// The `record` value of every approval this version writes.
pub const RECORD: &str = "slopewise approval record, version 1";

/// Prefixed to the signed bytes so a signature made for an approval can never be
/// passed off as a signature of anything else made with the same key.
const SIGNING_CONTEXT: &[u8] = b"slopewise approval record, version 1\n";

/// The fields a record must hold, in the order it holds them.
pub const FIELDS: [&str; 11] = [
    "record",
    "by",
    "role",
    "when",
    "meaning",
    "tool_version",
    "plan_file",
    "data_file",
    "data_sha256",
    "files",
    "signature",
];

/// The statement of what the approval means, when the approver gives none.
pub fn default_meaning(by: &str, role: &str) -> String {
    format!(
        "I, {by}, acting as {role}, have reviewed this report and its results and approve \
         them as the record of the analysis of the data file and plan named here. This \
         approval covers exactly the files whose SHA-256 it lists; any change to them ends it."
    )
}

/// One approval of one run folder.
#[derive(Debug, Clone, PartialEq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Approval {
    /// Always [`RECORD`].
    pub record: String,
    /// Who approves.
    pub by: String,
    /// In what role.
    pub role: String,
    /// When, RFC 3339 UTC.
    pub when: String,
    /// What the approval means.
    pub meaning: String,
    /// slopewise version that wrote the record.
    pub tool_version: String,
    /// The plan's file name when it ran.
    pub plan_file: String,
    /// The data path as the plan names it.
    pub data_file: String,
    /// SHA-256 of the data file's bytes at approval.
    pub data_sha256: String,
    /// SHA-256 of every file in the run folder at approval (the approvals folder
    /// left out), by relative path.
    pub files: BTreeMap<String, String>,
    /// The Ed25519 signature of [`Approval::signed_bytes`]; null when unsigned.
    pub signature: Option<Signature>,
}

/// An Ed25519 signature and the public key that checks it.
#[derive(Debug, Clone, PartialEq, Eq, Serialize, Deserialize)]
#[serde(deny_unknown_fields)]
pub struct Signature {
    /// Always "ed25519".
    pub algorithm: String,
    /// The verifying key, 64 hex digits.
    pub public_key: String,
    /// The signature, 128 hex digits.
    pub value: String,
}

/// The signed part of a record: every field but the signature, in a fixed order.
#[derive(Serialize)]
struct Signed<'a> {
    record: &'a str,
    by: &'a str,
    role: &'a str,
    when: &'a str,
    meaning: &'a str,
    tool_version: &'a str,
    plan_file: &'a str,
    data_file: &'a str,
    data_sha256: &'a str,
    files: &'a BTreeMap<String, String>,
}

/// Why a record cannot be read.
#[derive(Debug, Clone, PartialEq, Eq, thiserror::Error)]
pub enum ApprovalError {
    /// Not JSON, or not an object.
    #[error("it is not a JSON object ({0})")]
    NotJson(String),
    /// A required field is absent.
    #[error("it has no `{0}` field; every approval record holds {list}", list = FIELDS.join(", "))]
    Missing(&'static str),
    /// A field that must say something is empty.
    #[error("its `{0}` field is empty")]
    Empty(&'static str),
    /// Not a record this version writes.
    #[error("its `record` is \"{0}\", not \"{RECORD}\"")]
    WrongRecord(String),
    /// A field of the wrong type, or one that does not belong.
    #[error("{0}")]
    Invalid(String),
}

impl Approval {
    /// Reads a record, naming the first field that is missing or wrong.
    pub fn parse(bytes: &[u8]) -> Result<Approval, ApprovalError> {
        let value: serde_json::Value =
            serde_json::from_slice(bytes).map_err(|e| ApprovalError::NotJson(e.to_string()))?;
        let object = value
            .as_object()
            .ok_or_else(|| ApprovalError::NotJson("the top level is not an object".into()))?;
        if let Some(field) = FIELDS.iter().find(|f| !object.contains_key(**f)) {
            return Err(ApprovalError::Missing(field));
        }
        let a: Approval =
            serde_json::from_value(value).map_err(|e| ApprovalError::Invalid(e.to_string()))?;
        if a.record != RECORD {
            return Err(ApprovalError::WrongRecord(a.record));
        }
        let texts = [
            ("by", &a.by),
            ("role", &a.role),
            ("when", &a.when),
            ("meaning", &a.meaning),
            ("data_sha256", &a.data_sha256),
        ];
        if let Some((field, _)) = texts.iter().find(|(_, v)| v.trim().is_empty()) {
            return Err(ApprovalError::Empty(field));
        }
        Ok(a)
    }

    /// The record as written: pretty JSON with a final newline.
    pub fn to_bytes(&self) -> Vec<u8> {
        let mut s = serde_json::to_string_pretty(self).unwrap_or_default();
        s.push('\n');
        s.into_bytes()
    }

    /// The bytes a signature covers: a fixed context line, then compact JSON of
    /// every field but the signature, in declaration order (maps sorted by key).
    pub fn signed_bytes(&self) -> Vec<u8> {
        let signed = Signed {
            record: &self.record,
            by: &self.by,
            role: &self.role,
            when: &self.when,
            meaning: &self.meaning,
            tool_version: &self.tool_version,
            plan_file: &self.plan_file,
            data_file: &self.data_file,
            data_sha256: &self.data_sha256,
            files: &self.files,
        };
        let mut bytes = SIGNING_CONTEXT.to_vec();
        bytes.extend(serde_json::to_vec(&signed).unwrap_or_default());
        bytes
    }

    /// The record signed with `key`.
    pub fn sign(mut self, key: &SigningKey) -> Approval {
        let signature = key.sign(&self.signed_bytes());
        self.signature = Some(Signature {
            algorithm: "ed25519".into(),
            public_key: keys::to_hex(key.verifying_key().as_bytes()),
            value: keys::to_hex(&signature.to_bytes()),
        });
        self
    }

    /// Whether the record still holds for the folder as it is now. `trusted` lists
    /// the keys the checker accepts; empty means any key that verifies (and unsigned
    /// records) are accepted.
    pub fn check(&self, present: &Present, trusted: &[VerifyingKey]) -> Standing {
        let mut changes = Vec::new();
        for (file, approved) in &self.files {
            match present.files.get(file) {
                None => changes.push(Change::Missing(file.clone())),
                Some(now) if now != approved => changes.push(Change::Changed {
                    file: file.clone(),
                    approved: approved.clone(),
                    now: now.clone(),
                }),
                Some(_) => {}
            }
        }
        for file in present.files.keys() {
            if !self.files.contains_key(file) {
                changes.push(Change::Added(file.clone()));
            }
        }
        match &present.data_sha256 {
            Ok(now) if *now != self.data_sha256 => changes.push(Change::Data {
                file: self.data_file.clone(),
                approved: self.data_sha256.clone(),
                now: now.clone(),
            }),
            Ok(_) => {}
            Err(why) => changes.push(Change::DataUnreadable(why.clone())),
        }
        Standing {
            changes,
            signature: self.signature_state(trusted),
            trust_required: !trusted.is_empty(),
        }
    }

    fn signature_state(&self, trusted: &[VerifyingKey]) -> SignatureState {
        let Some(sig) = &self.signature else {
            return SignatureState::Unsigned;
        };
        if sig.algorithm != "ed25519" {
            return SignatureState::Invalid(format!(
                "the signature's algorithm is \"{}\"; only \"ed25519\" is known",
                sig.algorithm
            ));
        }
        let key = match keys::public_from_hex(&sig.public_key) {
            Ok(k) => k,
            Err(e) => return SignatureState::Invalid(format!("the record's public key: {e}")),
        };
        let Some(bytes) = keys::from_hex(&sig.value).and_then(|v| <[u8; 64]>::try_from(v).ok())
        else {
            return SignatureState::Invalid("the signature is not 128 hexadecimal digits".into());
        };
        let signature = ed25519_dalek::Signature::from_bytes(&bytes);
        if key.verify(&self.signed_bytes(), &signature).is_err() {
            return SignatureState::Invalid(
                "the signature does not match the record: the record was edited after \
                 signing, or signed with another key than the one it names"
                    .into(),
            );
        }
        let trusted = (!trusted.is_empty()).then(|| trusted.contains(&key));
        SignatureState::Valid {
            public_key: sig.public_key.clone(),
            trusted,
        }
    }
}

/// The folder as it is now, as the edge read it.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Present {
    /// SHA-256 of every file in the run folder, approvals left out.
    pub files: BTreeMap<String, String>,
    /// SHA-256 of the data file, or why it could not be read.
    pub data_sha256: Result<String, String>,
}

/// One thing that changed since an approval.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum Change {
    /// A file's bytes differ.
    Changed {
        /// Relative path.
        file: String,
        /// SHA-256 at approval.
        approved: String,
        /// SHA-256 now.
        now: String,
    },
    /// An approved file is gone.
    Missing(String),
    /// A file that was not there at approval.
    Added(String),
    /// The data file's bytes differ.
    Data {
        /// The data path as the plan names it.
        file: String,
        /// SHA-256 at approval.
        approved: String,
        /// SHA-256 now.
        now: String,
    },
    /// The data file cannot be read.
    DataUnreadable(String),
}

impl std::fmt::Display for Change {
    fn fmt(&self, f: &mut std::fmt::Formatter<'_>) -> std::fmt::Result {
        match self {
            Change::Changed {
                file,
                approved,
                now,
            } => write!(
                f,
                "{file} changed since the approval (SHA-256 now {}…, approved {}…)",
                short(now),
                short(approved)
            ),
            Change::Missing(file) => write!(f, "{file} was approved but is gone"),
            Change::Added(file) => write!(f, "{file} was added after the approval"),
            Change::Data {
                file,
                approved,
                now,
            } => write!(
                f,
                "the data file {file} changed since the approval (SHA-256 now {}…, approved {}…)",
                short(now),
                short(approved)
            ),
            Change::DataUnreadable(why) => write!(f, "the data file cannot be read: {why}"),
        }
    }
}

fn short(hex: &str) -> &str {
    hex.get(..12).unwrap_or(hex)
}

/// What the signature of a record shows.
#[derive(Debug, Clone, PartialEq, Eq)]
pub enum SignatureState {
    /// No signature.
    Unsigned,
    /// The signature matches the record and the key it names.
    Valid {
        /// That key, hex.
        public_key: String,
        /// Whether the key is among the trusted ones; `None` when none were given.
        trusted: Option<bool>,
    },
    /// The signature does not check, with why.
    Invalid(String),
}

/// Whether an approval still holds, and why not.
#[derive(Debug, Clone, PartialEq, Eq)]
pub struct Standing {
    /// What changed since the approval, in file order, the data last.
    pub changes: Vec<Change>,
    /// What the signature shows.
    pub signature: SignatureState,
    /// The checker named trusted keys, so an unsigned record does not hold.
    pub trust_required: bool,
}

impl Standing {
    /// True when nothing changed and the signature (if required) checks.
    pub fn holds(&self) -> bool {
        self.changes.is_empty()
            && match &self.signature {
                SignatureState::Unsigned => !self.trust_required,
                SignatureState::Valid { trusted, .. } => *trusted != Some(false),
                SignatureState::Invalid(_) => false,
            }
    }

    /// One line on the signature, then one per change.
    pub fn describe(&self) -> Vec<String> {
        let mut lines = vec![match &self.signature {
            SignatureState::Unsigned if self.trust_required => {
                "unsigned, but trusted keys were named: an unsigned record cannot be checked against them".to_string()
            }
            SignatureState::Unsigned => {
                "unsigned: the hashes can be checked, but nothing proves who wrote the record".to_string()
            }
            SignatureState::Valid {
                public_key,
                trusted: None,
            } => format!(
                "signature checks with the key it names ({}…); name that key with --trusted-key to tie it to a person",
                short(public_key)
            ),
            SignatureState::Valid {
                public_key,
                trusted: Some(true),
            } => format!("signature checks with a trusted key ({}…)", short(public_key)),
            SignatureState::Valid {
                public_key,
                trusted: Some(false),
            } => format!(
                "signed with a key that is not among the trusted keys ({}…)",
                short(public_key)
            ),
            SignatureState::Invalid(why) => format!("signature fails: {why}"),
        }];
        if self.changes.is_empty() {
            lines.push("every approved file and the data are unchanged".into());
        }
        lines.extend(self.changes.iter().map(ToString::to_string));
        lines
    }
}

#[cfg(test)]
mod tests {
    use super::*;

    fn record() -> Approval {
        Approval {
            record: RECORD.into(),
            by: "Ana Reviewer".into(),
            role: "QA reviewer".into(),
            when: "2026-01-02T03:04:05Z".into(),
            meaning: default_meaning("Ana Reviewer", "QA reviewer"),
            tool_version: "0.1.0".into(),
            plan_file: "plan.toml".into(),
            data_file: "data.csv".into(),
            data_sha256: "d".repeat(64),
            files: [
                ("plan.toml".to_string(), "a".repeat(64)),
                ("report.md".to_string(), "b".repeat(64)),
            ]
            .into(),
            signature: None,
        }
    }

    fn present(a: &Approval) -> Present {
        Present {
            files: a.files.clone(),
            data_sha256: Ok(a.data_sha256.clone()),
        }
    }

    #[test]
    fn a_signed_record_holds_until_anything_changes() {
        let key = SigningKey::from_bytes(&[1u8; 32]);
        let a = record().sign(&key);
        let back = Approval::parse(&a.to_bytes()).unwrap();
        assert_eq!(back, a);
        let now = present(&a);
        assert!(a.check(&now, &[]).holds());
        assert!(a.check(&now, &[key.verifying_key()]).holds());

        let mut edited = now.clone();
        edited.files.insert("report.md".into(), "c".repeat(64));
        let s = a.check(&edited, &[]);
        assert!(!s.holds());
        assert!(matches!(&s.changes[..], [Change::Changed { file, .. }] if file == "report.md"));

        let mut data = now.clone();
        data.data_sha256 = Ok("e".repeat(64));
        assert!(matches!(
            &a.check(&data, &[]).changes[..],
            [Change::Data { .. }]
        ));
    }

    #[test]
    fn a_wrong_key_or_an_edited_record_fails() {
        let key = SigningKey::from_bytes(&[1u8; 32]);
        let other = SigningKey::from_bytes(&[2u8; 32]);
        let a = record().sign(&key);
        let now = present(&a);
        // Not among the trusted keys.
        let s = a.check(&now, &[other.verifying_key()]);
        assert!(!s.holds());
        assert!(matches!(
            s.signature,
            SignatureState::Valid {
                trusted: Some(false),
                ..
            }
        ));
        // The record names another key than the one that signed it.
        let mut swapped = a.clone();
        swapped.signature.as_mut().unwrap().public_key =
            keys::to_hex(other.verifying_key().as_bytes());
        assert!(matches!(
            swapped.check(&now, &[]).signature,
            SignatureState::Invalid(_)
        ));
        // A field edited after signing.
        let mut edited = a.clone();
        edited.role = "director".into();
        assert!(!edited.check(&now, &[]).holds());
        // Unsigned: holds on hashes alone, unless keys are required.
        let unsigned = record();
        assert!(unsigned.check(&now, &[]).holds());
        assert!(!unsigned.check(&now, &[key.verifying_key()]).holds());
    }

    #[test]
    fn a_record_with_a_missing_field_is_rejected_by_name() {
        let a = record();
        for field in FIELDS {
            let mut v = serde_json::to_value(&a).unwrap();
            v.as_object_mut().unwrap().remove(field);
            let err = Approval::parse(&serde_json::to_vec(&v).unwrap()).unwrap_err();
            assert_eq!(err, ApprovalError::Missing(field));
            assert!(err.to_string().contains(&format!("no `{field}` field")));
        }
        let mut v = serde_json::to_value(&a).unwrap();
        v["role"] = "".into();
        assert_eq!(
            Approval::parse(&serde_json::to_vec(&v).unwrap()).unwrap_err(),
            ApprovalError::Empty("role")
        );
        assert!(matches!(
            Approval::parse(b"[1]"),
            Err(ApprovalError::NotJson(_))
        ));
    }
}
