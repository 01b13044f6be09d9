//! `burnin generate KIND --param …`: one subcommand per generator of the
//! core's catalogue, one option per parameter (its name with dashes), with
//! the catalogue's defaults and help.

use std::path::PathBuf;

use burnin::generate::{GENERATORS, GeneratorSpec, ParamError, ParamKind, ParamValue, Values};

use crate::files::{Failure, emit};
use crate::outputs::{check_outputs, write_output};

#[derive(clap::Args)]
pub struct Args {
    #[command(subcommand)]
    pub kind: GeneratorArgs,
    /// Seed of the generator's random draws.
    #[arg(long, default_value_t = 1, global = true)]
    pub seed: u64,
    /// Write to this file instead of standard output.
    #[arg(long, short, global = true)]
    pub output: Option<PathBuf>,
}

/// The generator and its parameters' values, from its subcommand.
pub struct GeneratorArgs {
    values: Values,
}

fn option_name(param: &str) -> String {
    param.replace('_', "-")
}

impl clap::Subcommand for GeneratorArgs {
    fn augment_subcommands(mut cmd: clap::Command) -> clap::Command {
        use clap::{Arg, ArgAction, value_parser};
        for g in GENERATORS {
            let mut sub = clap::Command::new(g.kind).about(g.about);
            for (old, new) in burnin::generate::catalog::OLD_KINDS {
                if *new == g.kind {
                    sub = sub.alias(*old);
                }
            }
            for p in g.params {
                let arg = Arg::new(p.name).long(option_name(p.name)).help(p.help);
                let arg = match p.kind {
                    ParamKind::Whole => arg
                        .value_name("N")
                        .value_parser(value_parser!(u64))
                        .default_value((p.default as u64).to_string()),
                    ParamKind::Number => arg
                        .value_name("X")
                        .value_parser(value_parser!(f64))
                        .allow_negative_numbers(true)
                        .default_value(p.default.to_string()),
                    ParamKind::Flag => arg.action(ArgAction::SetTrue),
                    ParamKind::OptionalWhole => {
                        arg.value_name("N").value_parser(value_parser!(u64))
                    }
                    ParamKind::Numbers => arg
                        .value_name("X,…")
                        .value_parser(value_parser!(f64))
                        .allow_negative_numbers(true)
                        .value_delimiter(',')
                        .action(ArgAction::Append),
                };
                sub = sub.arg(arg);
            }
            cmd = cmd.subcommand(sub);
        }
        cmd.subcommand_required(true)
    }
    fn augment_subcommands_for_update(cmd: clap::Command) -> clap::Command {
        Self::augment_subcommands(cmd)
    }
    fn has_subcommand(name: &str) -> bool {
        burnin::generate::catalog::info(name).is_some()
    }
}

impl clap::FromArgMatches for GeneratorArgs {
    fn from_arg_matches(m: &clap::ArgMatches) -> Result<Self, clap::Error> {
        use clap::error::ErrorKind;
        let (name, sub) = m
            .subcommand()
            .ok_or_else(|| clap::Error::new(ErrorKind::MissingSubcommand))?;
        let info = burnin::generate::catalog::info(name)
            .ok_or_else(|| clap::Error::new(ErrorKind::InvalidSubcommand))?;
        let mut values = Values::defaults(info);
        for p in info.params {
            let v = match p.kind {
                ParamKind::Whole | ParamKind::OptionalWhole => {
                    sub.get_one::<u64>(p.name).map(|&x| ParamValue::Whole(x))
                }
                ParamKind::Number => sub.get_one::<f64>(p.name).map(|&x| ParamValue::Number(x)),
                ParamKind::Flag => Some(ParamValue::Flag(sub.get_flag(p.name))),
                ParamKind::Numbers => sub
                    .get_many::<f64>(p.name)
                    .map(|xs| ParamValue::Numbers(xs.copied().collect())),
            };
            if let Some(v) = v {
                values.set(p.name, v);
            }
        }
        Ok(GeneratorArgs { values })
    }
    fn update_from_arg_matches(&mut self, m: &clap::ArgMatches) -> Result<(), clap::Error> {
        *self = Self::from_arg_matches(m)?;
        Ok(())
    }
}

/// A generator's parameter error, named as the CLI option.
fn param_failure(e: ParamError) -> Failure {
    Failure::Invalid(vec![format!("--{}: {}", option_name(e.param), e.message)])
}

pub fn generate(a: Args) -> Result<(), Failure> {
    if let Some(p) = &a.output {
        check_outputs(&[("--output", p)], &[], "")?;
    }
    let spec = GeneratorSpec {
        values: a.kind.values,
        seed: a.seed,
    };
    let model = spec.build().map_err(param_failure)?;
    let text = burnin::write_model(&model);
    match a.output {
        Some(p) => write_output(&p, text.as_bytes()).map_err(Failure::Io),
        None => emit(&text),
    }
}
