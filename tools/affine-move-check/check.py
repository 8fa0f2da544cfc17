# Stationarity check of AffineTasteHook's ratio on a pure hierarchy (probe, not CI).
# Run: python3 check.py  (numpy, scipy). Expected: KS p-values well above 0.001;
# with the psi Jacobian exponent off (u*(n+2) instead of u*(n-1)) they fall below 0.001.
# Stationarity check of the affine (location-and-spread) move's ratio on a pure hierarchy:
# psi_s ~ N(Gamma, V), Gamma ~ N(0, g2 I), V ~ IW(nu0, S0), n stores, no data.
# Gamma integrated: vec(psi) ~ N(0, I_n (x) V + 11' (x) g2 I). Start from exact prior draws,
# apply one MH move, compare the distribution of V_kk and psi_k spread with fresh prior draws.
import numpy as np
from scipy import stats
rng=np.random.default_rng(5)
p,n,g2=2,6,1.0
nu0=p+3; S0=0.1*nu0*np.eye(p)
def iw(rng):
    return stats.invwishart.rvs(df=nu0, scale=S0, random_state=rng)
def logpsi(psi,V):
    cov=np.kron(np.eye(n),V)+np.kron(np.ones((n,n)),g2*np.eye(p))
    return stats.multivariate_normal.logpdf(psi.ravel(),mean=np.zeros(n*p),cov=cov)
def logiw(V): return stats.invwishart.logpdf(V,df=nu0,scale=S0)
def move(psi,V,k,D,u):
    m=psi[:,k].mean(); psi2=psi.copy(); psi2[:,k]=m+D+np.exp(u)*(psi[:,k]-m)
    E=np.eye(p); E[k,k]=np.exp(u); V2=E@V@E
    lr=logpsi(psi2,V2)+logiw(V2)-logpsi(psi,V)-logiw(V)+u*(n-1)+u*(p+1)
    return psi2,V2,lr
N=20000; k=0
before=[];after=[];fresh=[]
for t in range(N):
    V=iw(rng); G=rng.normal(0,np.sqrt(g2),p); psi=G+rng.multivariate_normal(np.zeros(p),V,size=n)
    for rep in range(3):
        D,u=rng.normal(0,0.5),rng.normal(0,0.5)
        psi2,V2,lr=move(psi,V,k,D,u)
        if np.log(rng.random())<lr: psi,V=psi2,V2
    after.append((np.log(V[k,k]),np.log(psi[:,k].std()),psi[:,k].mean()))
    V=iw(rng); G=rng.normal(0,np.sqrt(g2),p); psi=G+rng.multivariate_normal(np.zeros(p),V,size=n)
    fresh.append((np.log(V[k,k]),np.log(psi[:,k].std()),psi[:,k].mean()))
after=np.array(after); fresh=np.array(fresh)
for j,name in enumerate(['log V_kk','log spread','mean']):
    print(name,'KS p = %.3f'%stats.ks_2samp(after[:,j],fresh[:,j]).pvalue, 'means %.3f %.3f'%(after[:,j].mean(),fresh[:,j].mean()))
