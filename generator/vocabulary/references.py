"""The literature behind each method, kept as data so the methods page cites exactly what ran."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["REFERENCES", "Reference"]


@dataclass(frozen=True)
class Reference:
    key: str
    text: str  # "Author: Title. Journal vol(issue):pages, year."
    doi: str | None = None

    @property
    def url(self) -> str | None:
        return f"https://doi.org/{self.doi}" if self.doi else None


_ALL = [
    Reference("freeman1977", "Freeman, L. C.: A set of measures of centrality based on betweenness. "
              "Sociometry 40(1):35-41, 1977.", "10.2307/3033543"),
    Reference("freeman1979", "Freeman, L. C.: Centrality in social networks: conceptual "
              "clarification. Social Networks 1(3):215-239, 1978/79.", "10.1016/0378-8733(78)90021-7"),
    Reference("brandes2001", "Brandes, U.: A faster algorithm for betweenness centrality. Journal "
              "of Mathematical Sociology 25(2):163-177, 2001.", "10.1080/0022250X.2001.9990249"),
    Reference("brandes2007", "Brandes, U. & Pich, C.: Centrality estimation in large networks. "
              "International Journal of Bifurcation and Chaos 17(7):2303-2318, 2007.",
              "10.1142/S0218127407018403"),
    Reference("magnien2009", "Magnien, C., Latapy, M. & Habib, M.: Fast computation of "
              "empirically tight bounds for the diameter of massive graphs. ACM Journal of "
              "Experimental Algorithmics 13:1.10, 2009.", "10.1145/1412228.1455266"),
    Reference("cochran1977", "Cochran, W. G.: Sampling Techniques, 3rd edition, chapter 6 (ratio "
              "estimators). Wiley, 1977."),
    Reference("wasserman1994", "Wasserman, S. & Faust, K.: Social Network Analysis: Methods and "
              "Applications. Cambridge University Press, 1994.", "10.1017/CBO9780511815478"),
    Reference("marchiori2000", "Marchiori, M. & Latora, V.: Harmony in the small-world. Physica A "
              "285(3-4):539-546, 2000.", "10.1016/S0378-4371(00)00311-3"),
    Reference("boldi2014", "Boldi, P. & Vigna, S.: Axioms for centrality. Internet Mathematics "
              "10(3-4):222-262, 2014.", "10.1080/15427951.2013.865686"),
    Reference("opsahl2010", "Opsahl, T., Agneessens, F. & Skvoretz, J.: Node centrality in weighted "
              "networks: generalizing degree and shortest paths. Social Networks 32(3):245-251, 2010.",
              "10.1016/j.socnet.2010.03.006"),
    Reference("borgatti1997", "Borgatti, S. P. & Everett, M. G.: Network analysis of 2-mode data. "
              "Social Networks 19(3):243-269, 1997.", "10.1016/S0378-8733(96)00301-2"),
    Reference("newman2001", "Newman, M. E. J.: Scientific collaboration networks. II. Shortest paths, "
              "weighted networks, and centrality. Physical Review E 64:016132, 2001.",
              "10.1103/PhysRevE.64.016132"),
    Reference("bonacich1972", "Bonacich, P.: Factoring and weighting approaches to status scores and "
              "clique identification. Journal of Mathematical Sociology 2(1):113-120, 1972.",
              "10.1080/0022250X.1972.9989806"),
    Reference("brin1998", "Brin, S. & Page, L.: The anatomy of a large-scale hypertextual Web search "
              "engine. Computer Networks and ISDN Systems 30(1-7):107-117, 1998.",
              "10.1016/S0169-7552(98)00110-X"),
    Reference("watts1998", "Watts, D. J. & Strogatz, S. H.: Collective dynamics of 'small-world' "
              "networks. Nature 393:440-442, 1998.", "10.1038/30918"),
    Reference("seidman1983", "Seidman, S. B.: Network structure and minimum degree. Social Networks "
              "5(3):269-287, 1983.", "10.1016/0378-8733(83)90028-X"),
    Reference("newman2002", "Newman, M. E. J.: Assortative mixing in networks. Physical Review "
              "Letters 89:208701, 2002.", "10.1103/PhysRevLett.89.208701"),
    Reference("newman2003", "Newman, M. E. J.: Mixing patterns in networks. Physical Review E "
              "67:026126, 2003.", "10.1103/PhysRevE.67.026126"),
    Reference("newman2004", "Newman, M. E. J. & Girvan, M.: Finding and evaluating community "
              "structure in networks. Physical Review E 69:026113, 2004.", "10.1103/PhysRevE.69.026113"),
    Reference("blondel2008", "Blondel, V. D., Guillaume, J.-L., Lambiotte, R. & Lefebvre, E.: Fast "
              "unfolding of communities in large networks. Journal of Statistical Mechanics P10008, "
              "2008.", "10.1088/1742-5468/2008/10/P10008"),
    Reference("traag2019", "Traag, V. A., Waltman, L. & van Eck, N. J.: From Louvain to Leiden: "
              "guaranteeing well-connected communities. Scientific Reports 9:5233, 2019.",
              "10.1038/s41598-019-41695-z"),
    Reference("raghavan2007", "Raghavan, U. N., Albert, R. & Kumara, S.: Near linear time algorithm "
              "to detect community structures in large-scale networks. Physical Review E 76:036106, "
              "2007.", "10.1103/PhysRevE.76.036106"),
    Reference("hubert1985", "Hubert, L. & Arabie, P.: Comparing partitions. Journal of "
              "Classification 2:193-218, 1985.", "10.1007/BF01908075"),
    Reference("danon2005", "Danon, L., Diaz-Guilera, A., Duch, J. & Arenas, A.: Comparing community "
              "structure identification. Journal of Statistical Mechanics P09008, 2005.",
              "10.1088/1742-5468/2005/09/P09008"),
    Reference("fortunato2010", "Fortunato, S.: Community detection in graphs. Physics Reports "
              "486(3-5):75-174, 2010.", "10.1016/j.physrep.2009.11.002"),
    Reference("karrer2008", "Karrer, B., Levina, E. & Newman, M. E. J.: Robustness of community "
              "structure in networks. Physical Review E 77:046119, 2008.",
              "10.1103/PhysRevE.77.046119"),
    Reference("maslov2002", "Maslov, S. & Sneppen, K.: Specificity and stability in topology of "
              "protein networks. Science 296(5569):910-913, 2002.", "10.1126/science.1065103"),
    Reference("north2002", "North, B. V., Curtis, D. & Sham, P. C.: A note on the calculation of "
              "empirical P values from Monte Carlo procedures. American Journal of Human Genetics "
              "71(2):439-441, 2002.", "10.1086/341527"),
    Reference("burt1992", "Burt, R. S.: Structural Holes: The Social Structure of Competition. "
              "Harvard University Press, 1992.", "10.4159/9780674029095"),
    Reference("krackhardt1988", "Krackhardt, D. & Stern, R. N.: Informal networks and "
              "organizational crises: an experimental simulation. Social Psychology Quarterly "
              "51(2):123-140, 1988.", "10.2307/2786835"),
    Reference("krackhardt1987", "Krackhardt, D.: QAP partialling as a test of spuriousness. Social "
              "Networks 9(2):171-186, 1987.", "10.1016/0378-8733(87)90012-8"),
    Reference("dekker2007", "Dekker, D., Krackhardt, D. & Snijders, T. A. B.: Sensitivity of MRQAP "
              "tests to collinearity and autocorrelation conditions. Psychometrika 72(4):563-581, "
              "2007.", "10.1007/s11336-007-9016-1"),
    Reference("fruchterman1991", "Fruchterman, T. M. J. & Reingold, E. M.: Graph drawing by "
              "force-directed placement. Software: Practice and Experience 21(11):1129-1164, 1991.",
              "10.1002/spe.4380211102"),
    Reference("okabe2008", "Okabe, M. & Ito, K.: Color Universal Design (CUD): how to make figures "
              "and presentations that are friendly to colorblind people. J*Fly, 2008."),
]

REFERENCES: dict[str, Reference] = {r.key: r for r in _ALL}
